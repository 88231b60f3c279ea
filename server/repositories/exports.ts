import { sql, type Kysely, type Transaction } from 'kysely'
import type pg from 'pg'
import type { Database } from '../db/database'
import type { ExportRow, NewExportRow } from '../db/tables/evidence'
import { CHANNELS } from '../db/channels'
import { READING_LENGTH, type ExportReading } from '../evidence/csv'

// Kysely access for evidence: the exports record, and the reads a pack needs that no other repository
// offers (readings page by page, coverage, coats and alerts of a period, revisions with their TDS file).
type Db = Kysely<Database> | Transaction<Database>

// ── exports ──────────────────────────────────────────────────────────────────────────────────────────

export function insertExport(db: Db, row: NewExportRow): Promise<ExportRow> {
  return db.insertInto('exports').values(row).returningAll().executeTakeFirstOrThrow()
}

export interface ExportListRow extends ExportRow {
  job_number: string | null
  booth_name: string | null
}

function exportQuery(db: Db) {
  return db
    .selectFrom('exports')
    .leftJoin('jobs', 'jobs.id', 'exports.job_id')
    .leftJoin('booths', 'booths.id', 'exports.booth_id')
    .selectAll('exports')
    .select(['jobs.number as job_number', 'booths.name as booth_name'])
}

/** Newest first; `before` pages by exported_at. */
export function listExports(db: Db, f: { limit: number; before?: Date; jobId?: number }): Promise<ExportListRow[]> {
  let q = exportQuery(db)
  if (f.before) q = q.where('exports.exported_at', '<', f.before)
  if (f.jobId) q = q.where('exports.job_id', '=', f.jobId)
  return q.orderBy('exports.exported_at', 'desc').orderBy('exports.id').limit(f.limit).execute()
}

export function findExport(db: Db, id: string): Promise<ExportListRow | undefined> {
  return exportQuery(db).where('exports.id', '=', id).executeTakeFirst()
}

// ── readings ─────────────────────────────────────────────────────────────────────────────────────────

export interface ReadingPage {
  /** The readings as PAGE_SQL encodes them (null when none); decodeReadings reads them. */
  encoded: string | null
  /** The exact stored timestamp of the last reading as text: the keyset cursor (a JS Date would drop microseconds). */
  lastKey: string | null
}

const asText = (v: string) => v
const TEXT_TYPES = { getTypeParser: () => asText }
// A whole page comes back as ONE text value: readings separated by LF, fields by TAB, in ExportReading order,
// null as an empty field. Only the device id is free text; its backslashes, TABs and LFs are escaped (\\ \t \n).
// Why not a row per reading: every row pg parses is a few objects made at pg's own allocation sites, shared
// with every other query in the process. Once V8 has decided to pretenure those sites (after some query held
// many rows across a scavenge, e.g. at start-up) every row of a long export is allocated straight into the old
// generation and piles up there as garbage until a full GC: measured +160 to +220 MB on a 30-day export, gone
// with --no-allocation-site-pretenuring. A page as one string is a handful of objects whatever its length.
const FIELD_SQL = [
  `to_char(ts AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`,
  `replace(replace(replace(device_id, '\\', '\\\\'), E'\\t', '\\t'), E'\\n', '\\n')`,
  `coalesce(seq::text, '')`,
  ...CHANNELS.map((c) => `coalesce(${c.column}::text, '')`),
  `CASE heater_on WHEN true THEN 'true' WHEN false THEN 'false' ELSE '' END`,
  `coalesce(dew_point_c::text, '')`,
]
if (FIELD_SQL.length !== READING_LENGTH) throw new Error('the page SQL must give every field of an ExportReading')
const PAGE_SQL = (after: boolean) => `
  WITH page AS (
    SELECT ts, device_id, seq, ${CHANNELS.map((c) => c.column).join(', ')}, heater_on, dew_point_c FROM readings
    WHERE booth_id = $1 AND ts ${after ? '>' : '>='} $2::timestamptz AND ts < $3::timestamptz
    ORDER BY ts
    LIMIT $4)
  SELECT max(ts)::text AS last_key, string_agg(concat_ws(E'\\t', ${FIELD_SQL.join(', ')}), E'\\n' ORDER BY ts) AS readings
  FROM page`

const ESCAPED = /\\([\\tn])/g
const unescapeField = (s: string) => s.replace(ESCAPED, (_, c: string) => (c === 't' ? '\t' : c === 'n' ? '\n' : c))

/** The readings of a page, from PAGE_SQL's encoding. */
export function decodeReadings(text: string | null): ExportReading[] {
  if (!text) return []
  return text.split('\n').map((line) => {
    const f: (string | null)[] = line.split('\t')
    if (f.length !== READING_LENGTH) throw new Error(`a reading of the export has ${f.length} fields, not ${READING_LENGTH}`)
    for (let i = 2; i < f.length; i++) if (f[i] === '') f[i] = null
    const device = f[1]!
    if (device.includes('\\')) f[1] = unescapeField(device)
    return f as ExportReading
  })
}

/**
 * One page of a booth's stored readings in [from, to), time-ordered, after the cursor `afterKey` (the lastKey
 * of the previous page). Keyset pagination on the (booth_id, ts) primary key: each page is an index range
 * scan, so memory and time per page stay flat however long the period. Plain pg rather than Kysely, with
 * every value as text (see PAGE_SQL).
 */
export async function readingPage(pool: pg.Pool, boothId: number, from: Date, to: Date, afterKey: string | null, limit: number): Promise<ReadingPage> {
  const res = await pool.query<{ last_key: string | null; readings: string | null }>({
    // Prepared once per connection (named): parse and plan would be much of a page's cost.
    name: afterKey === null ? 'evidence-reading-first-page' : 'evidence-reading-next-page',
    text: PAGE_SQL(afterKey !== null),
    values: [boothId, afterKey ?? from.toISOString(), to.toISOString(), limit],
    types: TEXT_TYPES,
  })
  const row = res.rows[0]
  return { encoded: row?.readings ?? null, lastKey: row?.last_key ?? null }
}

export async function countReadings(db: Db, boothIds: readonly number[], from: Date, to: Date): Promise<number> {
  if (!boothIds.length) return 0
  const r = await db
    .selectFrom('readings')
    .select((eb) => eb.fn.countAll<string>().as('n'))
    .where('booth_id', 'in', [...boothIds])
    .where('ts', '>=', from)
    .where('ts', '<', to)
    .executeTakeFirstOrThrow()
  return Number(r.n)
}

/**
 * Runs of at least `minMinutes` whole minutes in [first, last) (both on a minute) in which none of the booths
 * has a reading, from the rollups, oldest first. Found in SQL (gaps between consecutive minutes that have a
 * reading, with a sentinel at each end) so what comes back is as long as the gaps, not the period.
 */
export async function minuteGaps(db: Db, boothIds: readonly number[], first: Date, last: Date, minMinutes: number): Promise<{ from: Date; to: Date }[]> {
  const res = await sql<{ gap_from: Date; gap_to: Date }>`
    WITH present AS (
      SELECT DISTINCT minute FROM readings_minute
      WHERE booth_id = ANY(${[...boothIds]}::int[]) AND minute >= ${first} AND minute < ${last} AND n > 0
    ), edges AS (
      SELECT minute FROM present
      UNION ALL SELECT ${first}::timestamptz - interval '1 minute'
      UNION ALL SELECT ${last}::timestamptz
    ), steps AS (
      SELECT minute, lead(minute) OVER (ORDER BY minute) AS next_minute FROM edges
    )
    SELECT minute + interval '1 minute' AS gap_from, next_minute AS gap_to FROM steps
    WHERE next_minute >= minute + make_interval(mins => ${minMinutes + 1}::int)
    ORDER BY minute`.execute(db)
  return res.rows.map((r) => ({ from: r.gap_from, to: r.gap_to }))
}

// ── jobs, coats, bakes, alerts of a period ─────────────────────────────────────────────────────────

export function coatsOfBoothInPeriod(db: Db, boothId: number, from: Date, to: Date) {
  return db
    .selectFrom('coats')
    .selectAll()
    .where('booth_id', '=', boothId)
    .where('started_at', '<', to)
    .where((eb) => eb.or([eb('finished_at', 'is', null), eb('finished_at', '>=', from)]))
    .orderBy('started_at')
    .orderBy('id')
    .execute()
}

export function coatsOfJobs(db: Db, jobIds: readonly number[]) {
  if (!jobIds.length) return Promise.resolve([])
  return db.selectFrom('coats').selectAll().where('job_id', 'in', [...jobIds]).orderBy('started_at').orderBy('id').execute()
}

export function jobsByIds(db: Db, ids: readonly number[]) {
  if (!ids.length) return Promise.resolve([])
  return db.selectFrom('jobs').selectAll().where('id', 'in', [...ids]).orderBy('id').execute()
}

/** Bakes linked to the job (bake_jobs), oldest first. */
export async function bakeIdsOfJob(db: Db, jobId: number): Promise<number[]> {
  const rows = await db
    .selectFrom('bake_jobs')
    .innerJoin('bakes', 'bakes.id', 'bake_jobs.bake_id')
    .select('bakes.id')
    .where('bake_jobs.job_id', '=', jobId)
    .where('bakes.state', '!=', 'dismissed')
    .orderBy('bakes.started_at')
    .execute()
  return rows.map((r) => r.id)
}

/** Bakes of the booths that overlap [from, to), oldest first. */
export async function bakeIdsOfPeriod(db: Db, boothIds: readonly number[], from: Date, to: Date, limit = 200): Promise<number[]> {
  if (!boothIds.length) return []
  const rows = await db
    .selectFrom('bakes')
    .select('id')
    .where('booth_id', 'in', [...boothIds])
    .where('state', '!=', 'dismissed')
    .where('started_at', '<', to)
    .where((eb) => eb.or([eb('ended_at', 'is', null), eb('ended_at', '>=', from)]))
    .orderBy('started_at')
    .limit(limit)
    .execute()
  return rows.map((r) => r.id)
}

/** Alerts of the booths that were open at some time in [from, to) (opened before the end, not resolved before the start). */
export function alertsOfPeriod(db: Db, boothIds: readonly number[], from: Date, to: Date, limit = 500) {
  if (!boothIds.length) return Promise.resolve([])
  return db
    .selectFrom('alerts')
    .innerJoin('booths', 'booths.id', 'alerts.booth_id')
    .leftJoin('users as ack', 'ack.id', 'alerts.acknowledged_by')
    .leftJoin('users as res', 'res.id', 'alerts.resolved_by')
    .select([
      'alerts.id',
      'alerts.booth_id',
      'alerts.severity',
      'alerts.kind',
      'alerts.message',
      'alerts.state',
      'alerts.opened_at',
      'alerts.cleared_at',
      'alerts.acknowledged_at',
      'alerts.ack_note',
      'alerts.resolved_at',
      'alerts.resolution',
      'alerts.resolve_note',
      'booths.name as booth_name',
      'ack.name as acknowledged_by_name',
      'res.name as resolved_by_name',
    ])
    .where('alerts.booth_id', 'in', [...boothIds])
    .where('alerts.opened_at', '<', to)
    .where((eb) => eb.or([eb('alerts.resolved_at', 'is', null), eb('alerts.resolved_at', '>=', from)]))
    .orderBy('alerts.opened_at')
    .orderBy('alerts.id')
    .limit(limit)
    .execute()
}

/** Spec revisions with their product and TDS file (by SHA-256). */
export function revisionsWithTds(db: Db, ids: readonly number[]) {
  if (!ids.length) return Promise.resolve([])
  return db
    .selectFrom('spec_revisions as r')
    .innerJoin('products as p', 'p.id', 'r.product_id')
    .leftJoin('files as f', 'f.sha256', 'r.tds_sha256')
    .select([
      'r.id',
      'r.number',
      'r.frozen_at',
      'r.tds_sha256',
      'r.flash_min_minutes',
      'r.flash_max_minutes',
      'r.flash_before_next_minutes',
      'r.ref_temp_c',
      'r.recoat_window_minutes',
      'p.name as product_name',
      'f.original_name as tds_name',
    ])
    .where('r.id', 'in', [...ids])
    .orderBy('p.name')
    .orderBy('r.number')
    .execute()
}

/** job.status_changed events that closed one of the jobs (status → done), for the sign-offs. */
export function jobClosings(db: Db, jobIds: readonly number[]) {
  if (!jobIds.length) return Promise.resolve([])
  return db
    .selectFrom('event_log')
    .select(['seq', 'at', 'actor_label', 'subject_id', 'payload'])
    .where('subject_type', '=', 'job')
    .where('subject_id', 'in', jobIds.map(String))
    .where('type', '=', 'job.status_changed')
    .orderBy('seq')
    .execute()
}
