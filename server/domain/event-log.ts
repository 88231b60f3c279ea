import { createHash } from 'node:crypto'
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '../db/database'
import { canonicalJson } from './canonical-json'

// The append-only event log. Every recorded action calls appendEvent inside the same transaction
// as the action itself, so the action and its record commit or fail together. Rows are chained:
// hash = SHA-256(prev_hash + "\n" + canonical JSON of the row's fields).

export const GENESIS_HASH = '0'.repeat(64)
// Serialises appends across connections and instances (transaction-scoped advisory lock).
const CHAIN_LOCK_KEY = 704_113_2027

export interface EventInput {
  type: string
  actor: { id: number | null; label: string }
  subject: { type: string; id: string | number }
  data: Record<string, unknown>
  at?: Date
}

export interface ChainFields {
  seq: number
  at: Date
  type: string
  actor_id: number | null
  actor_label: string
  subject_type: string
  subject_id: string
  payload: string
}

export function hashEvent(prevHash: string, f: ChainFields): string {
  const body = canonicalJson({
    seq: f.seq,
    at: f.at.toISOString(),
    type: f.type,
    actor_id: f.actor_id,
    actor_label: f.actor_label,
    subject_type: f.subject_type,
    subject_id: f.subject_id,
    payload: f.payload,
  })
  return createHash('sha256').update(`${prevHash}\n${body}`).digest('hex')
}

export async function appendEvent(tx: Transaction<Database>, e: EventInput): Promise<{ seq: number; hash: string }> {
  await sql`SELECT pg_advisory_xact_lock(${CHAIN_LOCK_KEY})`.execute(tx)
  const last = await tx.selectFrom('event_log').select(['seq', 'hash']).orderBy('seq', 'desc').limit(1).executeTakeFirst()
  const fields: ChainFields = {
    seq: (last?.seq ?? 0) + 1,
    at: e.at ?? new Date(),
    type: e.type,
    actor_id: e.actor.id,
    actor_label: e.actor.label,
    subject_type: e.subject.type,
    subject_id: String(e.subject.id),
    payload: canonicalJson(e.data),
  }
  const prevHash = last?.hash ?? GENESIS_HASH
  const hash = hashEvent(prevHash, fields)
  await tx.insertInto('event_log').values({ ...fields, prev_hash: prevHash, hash }).execute()
  return { seq: fields.seq, hash }
}

/** Runs `action` and records its event in one transaction. The event may depend on the result. */
export async function recorded<T>(
  db: Kysely<Database>,
  action: (tx: Transaction<Database>) => Promise<T>,
  event: (result: T) => EventInput,
): Promise<T> {
  return db.transaction().execute(async (tx) => {
    const result = await action(tx)
    await appendEvent(tx, event(result))
    return result
  })
}

export type ChainVerdict =
  | { intact: true; count: number; head: { seq: number; hash: string } | null }
  | { intact: false; count: number; brokenAt: number; reason: string }

/** Walks the chain in order, in pages, and reports the first row whose link or hash is wrong. */
export async function verifyChain(db: Kysely<Database>, pageSize = 5_000): Promise<ChainVerdict> {
  let prevHash = GENESIS_HASH
  let expectedSeq = 1
  let count = 0
  let head: { seq: number; hash: string } | null = null
  for (;;) {
    const rows = await db.selectFrom('event_log').selectAll().where('seq', '>=', expectedSeq).orderBy('seq').limit(pageSize).execute()
    if (!rows.length) break
    for (const r of rows) {
      if (r.seq !== expectedSeq) return { intact: false, count, brokenAt: expectedSeq, reason: `row ${expectedSeq} is missing` }
      if (r.prev_hash !== prevHash) return { intact: false, count, brokenAt: r.seq, reason: 'the link to the previous row does not match' }
      if (hashEvent(prevHash, r) !== r.hash) return { intact: false, count, brokenAt: r.seq, reason: 'the row was changed after it was written' }
      prevHash = r.hash
      head = { seq: r.seq, hash: r.hash }
      expectedSeq++
      count++
    }
  }
  return { intact: true, count, head }
}

export async function chainHead(db: Kysely<Database>): Promise<{ seq: number; hash: string } | null> {
  return (await db.selectFrom('event_log').select(['seq', 'hash']).orderBy('seq', 'desc').limit(1).executeTakeFirst()) ?? null
}

/** The actor of an event from a signed-in user. */
export const actorOf = (u: { id: number; name: string; role: string }) => ({ id: u.id, label: `${u.name} (${u.role})` })
