import { sql, type Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { OutboxKind, OutboxRow } from '../db/tables/alerts'

// The mail outbox: rows are written in the same transaction as the decision to mail, and sent by the worker.
type Db = Kysely<Database>

export interface NewMail {
  kind: OutboxKind
  alertId: number | null
  alertIds: number[]
  recipients: string[]
  subject: string
  text: string
  html: string
  now: Date
}

export async function enqueueMail(db: Db, m: NewMail): Promise<number> {
  const r = await db
    .insertInto('outbox')
    .values({
      kind: m.kind,
      alert_id: m.alertId,
      alert_ids: JSON.stringify(m.alertIds),
      recipients: JSON.stringify(m.recipients),
      subject: m.subject,
      text_body: m.text,
      html_body: m.html,
      next_attempt_at: m.now,
      created_at: m.now,
    })
    .returning('id')
    .executeTakeFirstOrThrow()
  return r.id
}

/**
 * Takes up to `limit` due mails for this worker: each one's next attempt moves to `leaseUntil`, so another
 * instance (SKIP LOCKED) or the next round does not send it again while it is in flight; a worker that dies
 * mid-send leaves it to be retried when the lease runs out.
 */
export function claimDueMail(db: Db, now: Date, leaseUntil: Date, limit: number): Promise<OutboxRow[]> {
  return db
    .updateTable('outbox')
    .set((eb) => ({ attempts: eb('attempts', '+', 1), next_attempt_at: leaseUntil }))
    .where('id', 'in', (eb) =>
      eb
        .selectFrom('outbox')
        .select('id')
        .where('state', '=', 'queued')
        .where('next_attempt_at', '<=', now)
        .orderBy('next_attempt_at')
        .orderBy('id')
        .limit(limit)
        .forUpdate()
        .skipLocked(),
    )
    .returningAll()
    .execute()
}

export async function markMailSent(db: Db, id: number, messageId: string, at: Date): Promise<void> {
  await db.updateTable('outbox').set({ state: 'sent', sent_at: at, message_id: messageId, last_error: null }).where('id', '=', id).execute()
}

export async function markMailRetry(db: Db, id: number, error: string, nextAt: Date): Promise<void> {
  await db.updateTable('outbox').set({ last_error: error.slice(0, 1000), next_attempt_at: nextAt }).where('id', '=', id).execute()
}

export async function markMailFailed(db: Db, id: number, error: string): Promise<void> {
  await db.updateTable('outbox').set({ state: 'failed', last_error: error.slice(0, 1000) }).where('id', '=', id).execute()
}

/** Single alert mails queued since `since` (the storm limit counts them). */
export async function recentAlertMailTimes(db: Db, since: Date): Promise<Date[]> {
  const rows = await db.selectFrom('outbox').select('created_at').where('kind', '=', 'alert').where('created_at', '>', since).execute()
  return rows.map((r) => r.created_at)
}

export interface MailSummary {
  id: number
  kind: OutboxKind
  recipients: string[]
  subject: string
  state: OutboxRow['state']
  attempts: number
  last_error: string | null
  created_at: Date
  sent_at: Date | null
}

/** Mails about one alert: its own, its reminders, and digests that listed it. */
export function listMailForAlert(db: Db, alertId: number): Promise<MailSummary[]> {
  return db
    .selectFrom('outbox')
    .select(['id', 'kind', 'recipients', 'subject', 'state', 'attempts', 'last_error', 'created_at', 'sent_at'])
    .where((eb) => eb.or([eb('alert_id', '=', alertId), sql<boolean>`alert_ids @> ${JSON.stringify([alertId])}::jsonb`]))
    .orderBy('id')
    .execute()
}

export async function outboxCounts(db: Db): Promise<Record<OutboxRow['state'], number>> {
  const rows = await db.selectFrom('outbox').select(['state', (eb) => eb.fn.countAll<number>().as('n')]).groupBy('state').execute()
  const out: Record<OutboxRow['state'], number> = { queued: 0, sent: 0, failed: 0 }
  for (const r of rows) out[r.state] = Number(r.n)
  return out
}
