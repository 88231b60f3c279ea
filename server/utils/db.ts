import type { Kysely } from 'kysely'
import type pg from 'pg'
import { createDb, createPool } from '../db/client'
import type { Database } from '../db/database'
import { settings } from '../config'

let pool: pg.Pool | undefined
let db: Kysely<Database> | undefined

/** The process-wide pg pool (created on first use). */
export function usePool(): pg.Pool {
  if (!pool) {
    const s = settings()
    pool = createPool(s.DATABASE_URL, s.DATABASE_POOL_MAX)
  }
  return pool
}

/** The process-wide Kysely instance. */
export function useDb(): Kysely<Database> {
  if (!db) db = createDb(usePool())
  return db
}

export async function closeDb(): Promise<void> {
  const p = pool
  pool = undefined
  db = undefined
  if (p) await p.end()
}
