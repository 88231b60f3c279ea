import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { AlertRow, AlertState, NewAlertRow, NotifyState } from '../db/tables/alerts'

// Kysely access to alerts. Callers pass the db or a transaction so actions stay atomic.
type Db = Kysely<Database>

export interface AlertDetailRow extends AlertRow {
  booth_name: string
  booth_slug: string
  site_name: string
  time_zone: string
  acknowledged_by_name: string | null
  resolved_by_name: string | null
}

function detailQuery(db: Db) {
  return db
    .selectFrom('alerts')
    .innerJoin('booths', 'booths.id', 'alerts.booth_id')
    .innerJoin('sites', 'sites.id', 'booths.site_id')
    .leftJoin('users as ack', 'ack.id', 'alerts.acknowledged_by')
    .leftJoin('users as res', 'res.id', 'alerts.resolved_by')
    .selectAll('alerts')
    .select([
      'booths.name as booth_name',
      'booths.slug as booth_slug',
      'sites.name as site_name',
      'sites.time_zone as time_zone',
      'ack.name as acknowledged_by_name',
      'res.name as resolved_by_name',
    ])
}

export function findAlert(db: Db, id: number): Promise<AlertDetailRow | undefined> {
  return detailQuery(db).where('alerts.id', '=', id).executeTakeFirst()
}

export function findAlertsByIds(db: Db, ids: readonly number[]): Promise<AlertDetailRow[]> {
  if (!ids.length) return Promise.resolve([])
  return detailQuery(db).where('alerts.id', 'in', [...ids]).orderBy('alerts.opened_at').orderBy('alerts.id').execute()
}

export interface AlertFilter {
  boothId?: number
  /** 'active' = open or acknowledged. */
  state?: AlertState | 'active'
  kind?: string
  /** Opened at or after / before. */
  from?: Date
  to?: Date
  /** Page: alerts with an id below this. */
  beforeId?: number
  limit: number
}

export function listAlerts(db: Db, f: AlertFilter): Promise<AlertDetailRow[]> {
  let q = detailQuery(db)
  if (f.boothId !== undefined) q = q.where('alerts.booth_id', '=', f.boothId)
  if (f.state === 'active') q = q.where('alerts.state', '<>', 'resolved')
  else if (f.state) q = q.where('alerts.state', '=', f.state)
  if (f.kind) q = q.where('alerts.kind', '=', f.kind)
  if (f.from) q = q.where('alerts.opened_at', '>=', f.from)
  if (f.to) q = q.where('alerts.opened_at', '<', f.to)
  if (f.beforeId !== undefined) q = q.where('alerts.id', '<', f.beforeId)
  return q.orderBy('alerts.id', 'desc').limit(f.limit).execute()
}

/** Opens an alert unless one is already open or acknowledged for this watch and booth (partial unique index). */
export function insertOpenAlert(db: Db, row: NewAlertRow): Promise<AlertRow | undefined> {
  return db
    .insertInto('alerts')
    .values(row)
    .onConflict((oc) => oc.columns(['booth_id', 'rule_id']).where('state', '<>', 'resolved').doNothing())
    .returningAll()
    .executeTakeFirst()
}

export interface ClearPatch {
  at: Date
  value: number | null
  peak: number | null
  message: string
  now: Date
}

/** The condition cleared: the active alert resolves by itself. Returns it, or undefined when none was active. */
export function resolveActiveOnClear(db: Db, boothId: number, ruleId: string, p: ClearPatch): Promise<AlertRow | undefined> {
  return db
    .updateTable('alerts')
    .set((eb) => ({
      state: 'resolved',
      resolution: 'cleared',
      cleared_at: p.at,
      resolved_at: p.now,
      last_value: p.value,
      peak: p.peak ?? eb.ref('alerts.peak'),
      clear_message: p.message,
      next_escalation_at: null,
      updated_at: p.now,
    }))
    .where('booth_id', '=', boothId)
    .where('rule_id', '=', ruleId)
    .where('state', '<>', 'resolved')
    .returningAll()
    .executeTakeFirst()
}

/** The condition of an alert resolved by hand earlier has now cleared: note when (keeps the duration honest). */
export function noteClearAfterManual(db: Db, boothId: number, ruleId: string, p: ClearPatch): Promise<AlertRow | undefined> {
  return db
    .updateTable('alerts')
    .set((eb) => ({ cleared_at: p.at, last_value: p.value, peak: p.peak ?? eb.ref('alerts.peak'), clear_message: p.message, updated_at: p.now }))
    .where('id', '=', (eb) =>
      eb
        .selectFrom('alerts as a')
        .select('a.id')
        .where('a.booth_id', '=', boothId)
        .where('a.rule_id', '=', ruleId)
        .where('a.state', '=', 'resolved')
        .where('a.cleared_at', 'is', null)
        .orderBy('a.id', 'desc')
        .limit(1),
    )
    .returningAll()
    .executeTakeFirst()
}

/** Watches removed (or disabled, or changed kind): their active alerts end. */
export async function resolveForRemovedWatches(db: Db, boothId: number, ruleIds: readonly string[], now: Date): Promise<AlertRow[]> {
  if (!ruleIds.length) return []
  return db
    .updateTable('alerts')
    .set({ state: 'resolved', resolution: 'watch_removed', resolved_at: now, resolve_note: 'The watch was removed or switched off', next_escalation_at: null, updated_at: now })
    .where('booth_id', '=', boothId)
    .where('rule_id', 'in', [...ruleIds])
    .where('state', '<>', 'resolved')
    .returningAll()
    .execute()
}

export function acknowledgeAlert(db: Db, id: number, userId: number, note: string | null, now: Date): Promise<AlertRow | undefined> {
  return db
    .updateTable('alerts')
    .set({ state: 'acknowledged', acknowledged_at: now, acknowledged_by: userId, ack_note: note, next_escalation_at: null, updated_at: now })
    .where('id', '=', id)
    .where('state', '=', 'open')
    .returningAll()
    .executeTakeFirst()
}

export function resolveAlertByHand(db: Db, id: number, userId: number, note: string, now: Date): Promise<AlertRow | undefined> {
  return db
    .updateTable('alerts')
    .set({ state: 'resolved', resolution: 'manual', resolved_at: now, resolved_by: userId, resolve_note: note, next_escalation_at: null, updated_at: now })
    .where('id', '=', id)
    .where('state', '<>', 'resolved')
    .returningAll()
    .executeTakeFirst()
}

export interface ActiveCount {
  booth_id: number
  state: AlertState
  severity: string
  n: number
}

export function countActiveAlerts(db: Db): Promise<ActiveCount[]> {
  return db
    .selectFrom('alerts')
    .select(['booth_id', 'state', 'severity', (eb) => eb.fn.countAll<number>().as('n')])
    .where('state', '<>', 'resolved')
    .groupBy(['booth_id', 'state', 'severity'])
    .execute()
}

export function listActiveAlertKeys(db: Db): Promise<{ booth_id: number; rule_id: string; kind: string }[]> {
  return db.selectFrom('alerts').select(['booth_id', 'rule_id', 'kind']).where('state', '<>', 'resolved').execute()
}

// ---- notification bookkeeping (the notifier)

export type NotifyCandidate = AlertDetailRow

/** Alerts whose mail is due, locked so another instance skips them. */
export function lockDueNotifications(db: Db, now: Date, limit: number): Promise<NotifyCandidate[]> {
  return detailQuery(db)
    .where('alerts.notify_state', 'in', ['pending', 'deferred', 'digest'])
    .where('alerts.notify_due_at', '<=', now)
    .orderBy('alerts.notify_due_at')
    .orderBy('alerts.id')
    .limit(limit)
    .forUpdate(['alerts'])
    .skipLocked()
    .execute()
}

export async function lastNotifiedByWatch(db: Db, since: Date): Promise<{ booth_id: number; rule_id: string; at: Date }[]> {
  const rows = await db
    .selectFrom('alerts')
    .select(['booth_id', 'rule_id', (eb) => eb.fn.max('notified_at').as('at')])
    .where('notified_at', '>', since)
    .groupBy(['booth_id', 'rule_id'])
    .execute()
  return rows.filter((r): r is typeof r & { at: Date } => r.at instanceof Date)
}

/** When the digest being collected goes out (the earliest held alert not yet due). */
export async function nextDigestDue(db: Db, now: Date): Promise<Date | null> {
  const r = await db
    .selectFrom('alerts')
    .select((eb) => eb.fn.min('notify_due_at').as('due'))
    .where('notify_state', '=', 'digest')
    .where('notify_due_at', '>', now)
    .executeTakeFirst()
  return r?.due instanceof Date ? r.due : null
}

export async function setNotifyState(
  db: Db,
  ids: readonly number[],
  change: { state: NotifyState; dueAt?: Date; notifiedAt?: Date; nextEscalationAt?: Date | null },
): Promise<void> {
  if (!ids.length) return
  await db
    .updateTable('alerts')
    .set({
      notify_state: change.state,
      ...(change.dueAt !== undefined && { notify_due_at: change.dueAt }),
      ...(change.notifiedAt !== undefined && { notified_at: change.notifiedAt }),
      ...(change.nextEscalationAt !== undefined && { next_escalation_at: change.nextEscalationAt }),
    })
    .where('id', 'in', [...ids])
    .execute()
}

export function lockDueEscalations(db: Db, now: Date, limit: number): Promise<NotifyCandidate[]> {
  return detailQuery(db)
    .where('alerts.state', '=', 'open')
    .where('alerts.next_escalation_at', '<=', now)
    .orderBy('alerts.next_escalation_at')
    .limit(limit)
    .forUpdate(['alerts'])
    .skipLocked()
    .execute()
}

export async function setEscalation(db: Db, id: number, change: { escalations?: number; nextAt: Date | null }): Promise<void> {
  await db
    .updateTable('alerts')
    .set({ next_escalation_at: change.nextAt, ...(change.escalations !== undefined && { escalations: change.escalations }) })
    .where('id', '=', id)
    .execute()
}

/** Alerts whose mail decision is still to come. */
export async function countPendingNotifications(db: Db): Promise<number> {
  const r = await db
    .selectFrom('alerts')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('notify_state', 'in', ['pending', 'deferred', 'digest'])
    .executeTakeFirstOrThrow()
  return Number(r.n)
}

