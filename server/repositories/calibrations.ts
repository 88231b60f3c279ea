import type { Insertable, Kysely, Transaction } from 'kysely'
import type { Database } from '../db/database'
import type { CalibrationsTable } from '../db/tables/bakes'

type Db = Kysely<Database> | Transaction<Database>

/** Every calibration's offset, in effective order (for the in-memory cache). */
export function listAllOffsets(db: Db) {
  return db
    .selectFrom('calibrations')
    .select(['id', 'booth_id', 'channel', 'effective_at', 'offset_value'])
    .orderBy('booth_id')
    .orderBy('channel')
    .orderBy('effective_at')
    .orderBy('id')
    .execute()
}

export function listCalibrations(db: Db, boothId?: number, limit = 200) {
  let q = db
    .selectFrom('calibrations')
    .leftJoin('users', 'users.id', 'calibrations.recorded_by')
    .selectAll('calibrations')
    .select('users.name as recorded_by_name')
  if (boothId !== undefined) q = q.where('calibrations.booth_id', '=', boothId)
  return q.orderBy('calibrations.effective_at', 'desc').orderBy('calibrations.id', 'desc').limit(limit).execute()
}

export function insertCalibration(db: Db, row: Insertable<CalibrationsTable>) {
  return db.insertInto('calibrations').values(row).returningAll().executeTakeFirstOrThrow()
}

/** The latest calibration of each channel of a booth (for the next-due reminders). */
export function latestCalibrationPerChannel(db: Db, boothId: number) {
  return db
    .selectFrom('calibrations')
    .distinctOn('channel')
    .select(['channel', 'effective_at', 'next_due_at'])
    .where('booth_id', '=', boothId)
    .orderBy('channel')
    .orderBy('effective_at', 'desc')
    .orderBy('id', 'desc')
    .execute()
}
