import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { Coat, CoatOverride, CoatStartCheck } from '../db/tables/jobs'

type Db = Kysely<Database>

export function listCoatsOfJob(db: Db, jobId: number): Promise<Coat[]> {
  return db.selectFrom('coats').selectAll().where('job_id', '=', jobId).orderBy('started_at').orderBy('id').execute()
}

export function findCoat(db: Db, id: number): Promise<Coat | undefined> {
  return db.selectFrom('coats').selectAll().where('id', '=', id).executeTakeFirst()
}

export function lockCoat(db: Db, id: number): Promise<Coat | undefined> {
  return db.selectFrom('coats').selectAll().where('id', '=', id).forUpdate().executeTakeFirst()
}

export function findOpenCoatOfBooth(db: Db, boothId: number): Promise<Coat | undefined> {
  return db.selectFrom('coats').selectAll().where('booth_id', '=', boothId).where('finished_at', 'is', null).executeTakeFirst()
}

export function countCoatsOfSteps(db: Db, stepIds: number[]): Promise<{ step_id: number; n: number }[]> {
  if (!stepIds.length) return Promise.resolve([])
  return db
    .selectFrom('coats')
    .select(['step_id', (eb) => eb.fn.countAll<string>().as('n')])
    .where('step_id', 'in', stepIds)
    .groupBy('step_id')
    .execute()
    .then((rows) => rows.map((r) => ({ step_id: r.step_id, n: Number(r.n) })))
}

export interface NewCoat {
  jobId: number
  stepId: number
  boothId: number
  coatNumber: number
  painterId: number
  startedAt: Date
  overrides: CoatOverride[]
  startCheck: CoatStartCheck
}

export function insertCoat(db: Db, c: NewCoat): Promise<Coat> {
  return db
    .insertInto('coats')
    .values({
      job_id: c.jobId,
      step_id: c.stepId,
      booth_id: c.boothId,
      coat_number: c.coatNumber,
      painter_id: c.painterId,
      started_at: c.startedAt,
      overrides: JSON.stringify(c.overrides),
      start_check: JSON.stringify(c.startCheck),
    })
    .returningAll()
    .executeTakeFirstOrThrow()
}

export function finishCoatRow(db: Db, id: number, at: Date, by: number): Promise<Coat | undefined> {
  return db
    .updateTable('coats')
    .set({ finished_at: at, finished_by: by })
    .where('id', '=', id)
    .where('finished_at', 'is', null)
    .returningAll()
    .executeTakeFirst()
}
