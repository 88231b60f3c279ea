import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { Mix, MixOutcome } from '../db/tables/jobs'

type Db = Kysely<Database>

export function listOpenMixesOfBooth(db: Db, boothId: number): Promise<Mix[]> {
  return db.selectFrom('mixes').selectAll().where('booth_id', '=', boothId).where('closed_at', 'is', null).orderBy('mixed_at').orderBy('id').execute()
}

export function listMixesOfJob(db: Db, jobId: number): Promise<Mix[]> {
  return db.selectFrom('mixes').selectAll().where('job_id', '=', jobId).orderBy('mixed_at').orderBy('id').execute()
}

export function findMix(db: Db, id: number): Promise<Mix | undefined> {
  return db.selectFrom('mixes').selectAll().where('id', '=', id).executeTakeFirst()
}

export interface NewMix {
  boothId: number
  jobId: number | null
  stepId: number | null
  revisionId: number
  reducerGrade: string | null
  amountMl: number | null
  painterId: number
  mixedAt: Date
  airTempC: number | null
  reducerAdvised: string | null
  warnings: string[]
}

export function insertMix(db: Db, m: NewMix): Promise<Mix> {
  return db
    .insertInto('mixes')
    .values({
      booth_id: m.boothId,
      job_id: m.jobId,
      step_id: m.stepId,
      revision_id: m.revisionId,
      reducer_grade: m.reducerGrade,
      amount_ml: m.amountMl,
      painter_id: m.painterId,
      mixed_at: m.mixedAt,
      air_temp_c: m.airTempC,
      reducer_advised: m.reducerAdvised,
      warnings: JSON.stringify(m.warnings),
    })
    .returningAll()
    .executeTakeFirstOrThrow()
}

export function closeMixRow(db: Db, id: number, at: Date, outcome: MixOutcome, by: number): Promise<Mix | undefined> {
  return db
    .updateTable('mixes')
    .set({ closed_at: at, close_outcome: outcome, closed_by: by })
    .where('id', '=', id)
    .where('closed_at', 'is', null)
    .returningAll()
    .executeTakeFirst()
}
