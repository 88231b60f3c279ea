import type { Kysely } from 'kysely'
import type { Database } from '../db/database'

type Db = Kysely<Database>

export function insertPairingCode(db: Db, v: { boothId: number; codeHash: string; createdBy: number | null; expiresAt: Date }) {
  return db
    .insertInto('pairing_codes')
    .values({ booth_id: v.boothId, code_hash: v.codeHash, created_by: v.createdBy, expires_at: v.expiresAt })
    .returning(['id', 'booth_id', 'expires_at'])
    .executeTakeFirstOrThrow()
}

/**
 * Uses a code once: marks it used only when it is unused and unexpired, in one statement, so two
 * screens racing with the same code cannot both win.
 */
export function claimPairingCode(db: Db, codeHash: string, now: Date) {
  return db
    .updateTable('pairing_codes')
    .set({ used_at: now })
    .where('code_hash', '=', codeHash)
    .where('used_at', 'is', null)
    .where('expires_at', '>', now)
    .returning(['id', 'booth_id'])
    .executeTakeFirst()
}

/** Drops codes that can no longer be used (expired or used more than a day ago). */
export async function deleteStalePairingCodes(db: Db, now: Date): Promise<void> {
  const dayAgo = new Date(now.getTime() - 86_400_000)
  await db
    .deleteFrom('pairing_codes')
    .where((eb) => eb.or([eb('expires_at', '<', dayAgo), eb('used_at', '<', dayAgo)]))
    .execute()
}
