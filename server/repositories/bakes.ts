import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '../db/database'
import type { Bake, BakeUpdate, NewBake } from '../db/tables/bakes'

// Kysely access to bakes and the jobs linked to them. Callers pass the db or a transaction so each action
// and its event-log entry commit together.
type Db = Kysely<Database> | Transaction<Database>

export interface BakeListRow extends Bake {
  booth_name: string
  started_by_name: string | null
  confirmed_by_name: string | null
  ended_by_name: string | null
  signed_off_by_name: string | null
}

function bakeQuery(db: Db) {
  return db
    .selectFrom('bakes')
    .innerJoin('booths', 'booths.id', 'bakes.booth_id')
    .leftJoin('users as us', 'us.id', 'bakes.started_by')
    .leftJoin('users as uc', 'uc.id', 'bakes.confirmed_by')
    .leftJoin('users as ue', 'ue.id', 'bakes.ended_by')
    .leftJoin('users as uo', 'uo.id', 'bakes.signed_off_by')
    .selectAll('bakes')
    .select([
      'booths.name as booth_name',
      'us.name as started_by_name',
      'uc.name as confirmed_by_name',
      'ue.name as ended_by_name',
      'uo.name as signed_off_by_name',
    ])
}

export async function findBake(db: Db, id: number): Promise<BakeListRow | undefined> {
  return bakeQuery(db).where('bakes.id', '=', id).executeTakeFirst()
}

/** Locks a bake for the rest of the transaction. */
export async function lockBake(tx: Transaction<Database>, id: number): Promise<Bake | undefined> {
  return tx.selectFrom('bakes').selectAll().where('id', '=', id).forUpdate().executeTakeFirst()
}

export interface BakeFilter {
  boothId?: number
  state?: Bake['state']
  running?: boolean
  toConfirm?: boolean
  from?: Date
  to?: Date
  limit?: number
}

export async function listBakes(db: Db, f: BakeFilter = {}): Promise<BakeListRow[]> {
  let q = bakeQuery(db)
  if (f.boothId !== undefined) q = q.where('bakes.booth_id', '=', f.boothId)
  if (f.state) q = q.where('bakes.state', '=', f.state)
  if (f.running) q = q.where('bakes.ended_at', 'is', null)
  if (f.toConfirm) q = q.where('bakes.state', '=', 'detected')
  if (f.from) q = q.where((eb) => eb.or([eb('bakes.ended_at', 'is', null), eb('bakes.ended_at', '>=', f.from!)]))
  if (f.to) q = q.where('bakes.started_at', '<', f.to)
  return q.orderBy('bakes.started_at', 'desc').orderBy('bakes.id', 'desc').limit(f.limit ?? 100).execute()
}

export async function runningBakeOf(db: Db, boothId: number): Promise<Bake | undefined> {
  return db.selectFrom('bakes').selectAll().where('booth_id', '=', boothId).where('ended_at', 'is', null).executeTakeFirst()
}

/** Every running bake (the detector's state at start-up). */
export function listRunningBakes(db: Db) {
  return db.selectFrom('bakes').select(['id', 'booth_id', 'started_at', 'source']).where('ended_at', 'is', null).execute()
}

/** Inserts unless the booth already has a running bake; undefined then (the partial unique index decides). */
export async function insertBakeIfNone(db: Db, row: NewBake): Promise<Bake | undefined> {
  return db
    .insertInto('bakes')
    .values(row)
    .onConflict((oc) => oc.column('booth_id').where('ended_at', 'is', null).doNothing())
    .returningAll()
    .executeTakeFirst()
}

export async function updateBake(db: Db, id: number, changes: BakeUpdate): Promise<Bake> {
  return db
    .updateTable('bakes')
    .set({ ...changes, updated_at: new Date() })
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirstOrThrow()
}

// ── jobs in the booth ─────────────────────────────────────────────────────────────────────────────

export interface JobInBooth {
  job_id: number
  number: string
  vehicle: string
  status: string
  step_id: number | null
  revision_id: number | null
}

/**
 * Jobs in the booth (status in_booth or curing), each with its last product: the step of its latest coat
 * (null when no coat is recorded yet).
 */
export async function jobsInBooth(db: Db, boothId: number): Promise<JobInBooth[]> {
  const res = await sql<JobInBooth>`
    SELECT j.id AS job_id, j.number, j.vehicle, j.status, c.step_id, s.revision_id
    FROM jobs j
    LEFT JOIN LATERAL (
      SELECT step_id FROM coats WHERE coats.job_id = j.id ORDER BY started_at DESC, id DESC LIMIT 1
    ) c ON true
    LEFT JOIN job_steps s ON s.id = c.step_id
    WHERE j.booth_id = ${boothId} AND j.status IN ('in_booth', 'curing')
    ORDER BY j.id`.execute(db)
  return res.rows
}

export async function linkJobs(db: Db, bakeId: number, links: readonly JobInBooth[]): Promise<void> {
  if (!links.length) return
  await db
    .insertInto('bake_jobs')
    .values(links.map((l) => ({ bake_id: bakeId, job_id: l.job_id, step_id: l.step_id, revision_id: l.revision_id })))
    .onConflict((oc) => oc.columns(['bake_id', 'job_id']).doUpdateSet((eb) => ({ step_id: eb.ref('excluded.step_id'), revision_id: eb.ref('excluded.revision_id') })))
    .execute()
}

export interface LinkedJob {
  bake_id: number
  job_id: number
  step_id: number | null
  revision_id: number | null
  number: string
  vehicle: string
}

export async function linkedJobs(db: Db, bakeIds: readonly number[]): Promise<LinkedJob[]> {
  if (!bakeIds.length) return []
  return db
    .selectFrom('bake_jobs')
    .innerJoin('jobs', 'jobs.id', 'bake_jobs.job_id')
    .select(['bake_jobs.bake_id', 'bake_jobs.job_id', 'bake_jobs.step_id', 'bake_jobs.revision_id', 'jobs.number', 'jobs.vehicle'])
    .where('bake_jobs.bake_id', 'in', [...bakeIds])
    .orderBy('bake_jobs.job_id')
    .execute()
}

// ── readings and counts ──────────────────────────────────────────────────────────────────────────

export interface RawBakeSample {
  ts: Date
  panel_temp_c: number | null
  air_temp_c: number | null
  heater_on: boolean | null
}

/** Stored (raw) readings of a booth in [from, to], time-ordered: the channels a bake needs. */
export function bakeReadings(db: Db, boothId: number, from: Date, to: Date): Promise<RawBakeSample[]> {
  return db
    .selectFrom('readings')
    .select(['ts', 'panel_temp_c', 'air_temp_c', 'heater_on'])
    .where('booth_id', '=', boothId)
    .where('ts', '>=', from)
    .where('ts', '<=', to)
    .orderBy('ts')
    .execute()
}

/** Bake cycles of a booth that started in [from, to) (dismissed detections do not count). */
export async function countBakes(db: Db, boothId: number, from: Date | null, to: Date): Promise<number> {
  let q = db
    .selectFrom('bakes')
    .select((eb) => eb.fn.countAll<string>().as('n'))
    .where('booth_id', '=', boothId)
    .where('state', '!=', 'dismissed')
    .where('started_at', '<', to)
  if (from) q = q.where('started_at', '>=', from)
  const r = await q.executeTakeFirstOrThrow()
  return Number(r.n)
}
