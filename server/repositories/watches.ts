import { sql, type Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { StoredWatch } from '../db/tables/alerts'

// Watch sets (rules per booth) and the evaluators' saved state.
type Db = Kysely<Database>

export interface WatchSetRow {
  booth_id: number
  rules: StoredWatch[]
  version: number
  updated_by: number | null
  updated_at: Date
  updated_by_name: string | null
}

function setQuery(db: Db) {
  return db
    .selectFrom('watch_sets')
    .leftJoin('users', 'users.id', 'watch_sets.updated_by')
    .select([
      'watch_sets.booth_id',
      'watch_sets.rules',
      'watch_sets.version',
      'watch_sets.updated_by',
      'watch_sets.updated_at',
      'users.name as updated_by_name',
    ])
}

export function findWatchSet(db: Db, boothId: number): Promise<WatchSetRow | undefined> {
  return setQuery(db).where('watch_sets.booth_id', '=', boothId).executeTakeFirst()
}

export function listWatchSets(db: Db): Promise<WatchSetRow[]> {
  return setQuery(db).orderBy('watch_sets.booth_id').execute()
}

export function listWatchSetVersions(db: Db): Promise<{ booth_id: number; version: number }[]> {
  return db.selectFrom('watch_sets').select(['booth_id', 'version']).execute()
}

export async function saveWatchSet(db: Db, boothId: number, watches: StoredWatch[], userId: number): Promise<{ version: number }> {
  const rules = JSON.stringify(watches)
  const now = new Date()
  return db
    .insertInto('watch_sets')
    .values({ booth_id: boothId, rules, updated_by: userId, updated_at: now })
    .onConflict((oc) =>
      oc.column('booth_id').doUpdateSet({
        rules,
        updated_by: userId,
        updated_at: now,
        version: sql<number>`watch_sets.version + 1`,
      }),
    )
    .returning('version')
    .executeTakeFirstOrThrow()
}

export async function deleteWatchSet(db: Db, boothId: number): Promise<boolean> {
  const r = await db.deleteFrom('watch_sets').where('booth_id', '=', boothId).executeTakeFirst()
  return Number(r.numDeletedRows) > 0
}

export function listWatchStates(db: Db): Promise<{ booth_id: number; snapshot: unknown; application_window: unknown }[]> {
  return db.selectFrom('watch_states').select(['booth_id', 'snapshot', 'application_window']).execute()
}

export async function saveWatchState(db: Db, boothId: number, snapshot: unknown, applicationWindow: unknown): Promise<void> {
  const snap = JSON.stringify(snapshot)
  const win = applicationWindow === null || applicationWindow === undefined ? null : JSON.stringify(applicationWindow)
  const now = new Date()
  await db
    .insertInto('watch_states')
    .values({ booth_id: boothId, snapshot: snap, application_window: win, saved_at: now })
    .onConflict((oc) => oc.column('booth_id').doUpdateSet({ snapshot: snap, application_window: win, saved_at: now }))
    .execute()
}
