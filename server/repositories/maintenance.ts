import { sql, type Insertable, type Kysely, type Transaction } from 'kysely'
import type { BoothMode, Database } from '../db/database'
import type { FilterChangesTable, InspectionsTable, MaintenanceNotesTable, MaintenanceRulesTable } from '../db/tables/bakes'

// Kysely access to booth upkeep records (filter changes, inspections, notes and service records, reminder
// rules) and the usage figures the reminders need (hours per controller mode, filter pressure-drop points).
type Db = Kysely<Database> | Transaction<Database>

export function insertFilterChange(db: Db, row: Insertable<FilterChangesTable>) {
  return db.insertInto('filter_changes').values(row).returningAll().executeTakeFirstOrThrow()
}

export function insertInspection(db: Db, row: Insertable<InspectionsTable>) {
  return db.insertInto('inspections').values(row).returningAll().executeTakeFirstOrThrow()
}

export function insertNote(db: Db, row: Insertable<MaintenanceNotesTable>) {
  return db.insertInto('maintenance_notes').values(row).returningAll().executeTakeFirstOrThrow()
}

export function upsertRule(db: Db, row: Insertable<MaintenanceRulesTable>) {
  const { booth_id: _b, task: _t, ...rest } = row
  return db
    .insertInto('maintenance_rules')
    .values(row)
    .onConflict((oc) => oc.columns(['booth_id', 'task']).doUpdateSet({ ...rest, updated_at: new Date() }))
    .returningAll()
    .executeTakeFirstOrThrow()
}

export function listRules(db: Db, boothId: number) {
  return db.selectFrom('maintenance_rules').selectAll().where('booth_id', '=', boothId).execute()
}

export function lastFilterChange(db: Db, boothId: number, filter: 'intake' | 'exhaust') {
  return db
    .selectFrom('filter_changes')
    .selectAll()
    .where('booth_id', '=', boothId)
    .where('filter', '=', filter)
    .orderBy('changed_at', 'desc')
    .orderBy('id', 'desc')
    .limit(1)
    .executeTakeFirst()
}

export function lastInspection(db: Db, boothId: number) {
  return db.selectFrom('inspections').selectAll().where('booth_id', '=', boothId).orderBy('inspected_at', 'desc').limit(1).executeTakeFirst()
}

export function lastNoteOfKind(db: Db, boothId: number, kind: 'note' | 'heater_service') {
  return db
    .selectFrom('maintenance_notes')
    .selectAll()
    .where('booth_id', '=', boothId)
    .where('kind', '=', kind)
    .orderBy('noted_at', 'desc')
    .limit(1)
    .executeTakeFirst()
}

export interface RangeFilter {
  from?: Date
  to?: Date
  limit: number
}

export function listFilterChanges(db: Db, boothId: number, f: RangeFilter) {
  let q = db.selectFrom('filter_changes').leftJoin('users', 'users.id', 'filter_changes.recorded_by').selectAll('filter_changes').select('users.name as recorded_by_name').where('filter_changes.booth_id', '=', boothId)
  if (f.from) q = q.where('filter_changes.changed_at', '>=', f.from)
  if (f.to) q = q.where('filter_changes.changed_at', '<', f.to)
  return q.orderBy('filter_changes.changed_at', 'desc').limit(f.limit).execute()
}

export function listInspections(db: Db, boothId: number, f: RangeFilter) {
  let q = db.selectFrom('inspections').leftJoin('users', 'users.id', 'inspections.recorded_by').selectAll('inspections').select('users.name as recorded_by_name').where('inspections.booth_id', '=', boothId)
  if (f.from) q = q.where('inspections.inspected_at', '>=', f.from)
  if (f.to) q = q.where('inspections.inspected_at', '<', f.to)
  return q.orderBy('inspections.inspected_at', 'desc').limit(f.limit).execute()
}

export function listNotes(db: Db, boothId: number, f: RangeFilter) {
  let q = db.selectFrom('maintenance_notes').leftJoin('users', 'users.id', 'maintenance_notes.recorded_by').selectAll('maintenance_notes').select('users.name as recorded_by_name').where('maintenance_notes.booth_id', '=', boothId)
  if (f.from) q = q.where('maintenance_notes.noted_at', '>=', f.from)
  if (f.to) q = q.where('maintenance_notes.noted_at', '<', f.to)
  return q.orderBy('maintenance_notes.noted_at', 'desc').limit(f.limit).execute()
}

export function listCalibrationsInRange(db: Db, boothId: number, f: RangeFilter) {
  let q = db.selectFrom('calibrations').leftJoin('users', 'users.id', 'calibrations.recorded_by').selectAll('calibrations').select('users.name as recorded_by_name').where('calibrations.booth_id', '=', boothId)
  if (f.from) q = q.where('calibrations.effective_at', '>=', f.from)
  if (f.to) q = q.where('calibrations.effective_at', '<', f.to)
  return q.orderBy('calibrations.effective_at', 'desc').limit(f.limit).execute()
}

/**
 * Hours per controller mode over [from, to): each mode message holds until the next one (the last until `to`).
 * from = null: since the booth's first mode message.
 */
export async function modeHours(db: Db, boothId: number, from: Date | null, to: Date): Promise<Record<BoothMode, number>> {
  const lower = from ?? new Date(0)
  const res = await sql<{ mode: BoothMode; hours: number | string | null }>`
    WITH m AS (
      SELECT mode, ts, lead(ts) OVER (ORDER BY ts) AS next_ts FROM booth_modes WHERE booth_id = ${boothId} AND ts < ${to}
    )
    SELECT mode, sum(extract(epoch FROM (least(coalesce(next_ts, ${to}::timestamptz), ${to}::timestamptz) - greatest(ts, ${lower}::timestamptz)))) / 3600.0 AS hours
    FROM m
    WHERE coalesce(next_ts, ${to}::timestamptz) > ${lower}::timestamptz
    GROUP BY mode`.execute(db)
  const out: Record<BoothMode, number> = { idle: 0, spray: 0, flash: 0, bake: 0, cool: 0 }
  for (const r of res.rows) out[r.mode] = Math.max(0, Number(r.hours ?? 0))
  return out
}

/** The first mode message of a booth (when its hour counters begin), or null. */
export async function firstModeAt(db: Db, boothId: number): Promise<Date | null> {
  const r = await db.selectFrom('booth_modes').select('ts').where('booth_id', '=', boothId).orderBy('ts').limit(1).executeTakeFirst()
  return r?.ts ?? null
}

/**
 * Hourly points of a filter's pressure drop at working airflow over [from, to): from the per-minute rollups,
 * the highest reading of each hour among the minutes whose airflow was within 80 % of the window's highest
 * (the drop depends on the flow, so idle minutes would drag the line down).
 */
export async function filterDpHourly(db: Db, boothId: number, filter: 'intake' | 'exhaust', from: Date, to: Date): Promise<{ t: Date; dp: number }[]> {
  const col = sql.ref(filter === 'intake' ? 'intake_filter_dp_pa_max' : 'exhaust_filter_dp_pa_max')
  const res = await sql<{ t: Date; dp: number }>`
    WITH m AS (
      SELECT minute, ${col} AS dp, airflow_mps_max AS flow FROM readings_minute
      WHERE booth_id = ${boothId} AND minute >= ${from} AND minute < ${to} AND ${col} IS NOT NULL
    ), ref AS (SELECT max(flow) AS f FROM m)
    SELECT date_trunc('hour', minute) AS t, max(dp)::float8 AS dp
    FROM m, ref
    WHERE ref.f IS NULL OR m.flow IS NULL OR m.flow >= 0.8 * ref.f
    GROUP BY 1 ORDER BY 1`.execute(db)
  return res.rows.map((r) => ({ t: r.t, dp: Number(r.dp) }))
}
