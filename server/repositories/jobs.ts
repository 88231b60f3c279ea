import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { Job, JobStatus, JobStep, NewJob } from '../db/tables/jobs'

type Db = Kysely<Database>

export interface JobFilter {
  status?: JobStatus | 'active'
  boothId?: number
}

export function listJobs(db: Db, f: JobFilter = {}): Promise<Job[]> {
  let q = db.selectFrom('jobs').selectAll()
  if (f.status === 'active') q = q.where('status', '!=', 'done')
  else if (f.status) q = q.where('status', '=', f.status)
  if (f.boothId) q = q.where('booth_id', '=', f.boothId)
  return q.orderBy('updated_at', 'desc').orderBy('id', 'desc').limit(500).execute()
}

export function findJob(db: Db, id: number): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('id', '=', id).executeTakeFirst()
}

/** Locks the job row for the rest of the transaction (coat start / finish serialise per job). */
export function lockJob(db: Db, id: number): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('id', '=', id).forUpdate().executeTakeFirst()
}

export function findJobByNumber(db: Db, number: string): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('number', '=', number).executeTakeFirst()
}

export function insertJob(db: Db, job: NewJob): Promise<Job> {
  return db.insertInto('jobs').values(job).returningAll().executeTakeFirstOrThrow()
}

export interface JobChanges {
  number?: string
  vehicle?: string
  colourCode?: string
  panels?: string[]
  notes?: string
  painterId?: number | null
  boothId?: number | null
  status?: JobStatus
}

export function updateJob(db: Db, id: number, c: JobChanges): Promise<Job | undefined> {
  return db
    .updateTable('jobs')
    .set({
      ...(c.number !== undefined && { number: c.number }),
      ...(c.vehicle !== undefined && { vehicle: c.vehicle }),
      ...(c.colourCode !== undefined && { colour_code: c.colourCode }),
      ...(c.panels !== undefined && { panels: c.panels }),
      ...(c.notes !== undefined && { notes: c.notes }),
      ...(c.painterId !== undefined && { painter_id: c.painterId }),
      ...(c.boothId !== undefined && { booth_id: c.boothId }),
      ...(c.status !== undefined && { status: c.status }),
      updated_at: new Date(),
    })
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst()
}

export function listSteps(db: Db, jobId: number): Promise<JobStep[]> {
  return db.selectFrom('job_steps').selectAll().where('job_id', '=', jobId).orderBy('position').execute()
}

export function listStepsOfJobs(db: Db, jobIds: number[]): Promise<JobStep[]> {
  if (!jobIds.length) return Promise.resolve([])
  return db.selectFrom('job_steps').selectAll().where('job_id', 'in', jobIds).orderBy('job_id').orderBy('position').execute()
}

export interface StepValues {
  revisionId: number
  coatsPlanned: number
  note: string
}

/**
 * Writes the finish plan in order: kept steps are updated in place (their coats stay attached),
 * new ones inserted, the rest deleted. Positions are moved out of the way first so the
 * (job_id, position) uniqueness holds at every statement.
 */
export async function replaceSteps(db: Db, jobId: number, steps: (StepValues & { id?: number })[], removeIds: number[]): Promise<JobStep[]> {
  if (removeIds.length) await db.deleteFrom('job_steps').where('job_id', '=', jobId).where('id', 'in', removeIds).execute()
  await db
    .updateTable('job_steps')
    .set((eb) => ({ position: eb('position', '+', 1000) }))
    .where('job_id', '=', jobId)
    .execute()
  for (const [i, s] of steps.entries()) {
    const values = { position: i + 1, revision_id: s.revisionId, coats_planned: s.coatsPlanned, note: s.note }
    if (s.id) await db.updateTable('job_steps').set(values).where('id', '=', s.id).where('job_id', '=', jobId).execute()
    else await db.insertInto('job_steps').values({ ...values, job_id: jobId }).execute()
  }
  return listSteps(db, jobId)
}

/** The jobs a booth may be working on (not done), oldest first. */
export function listOpenJobsOfBooth(db: Db, boothId: number): Promise<Job[]> {
  return db.selectFrom('jobs').selectAll().where('booth_id', '=', boothId).where('status', '!=', 'done').orderBy('created_at').orderBy('id').execute()
}
