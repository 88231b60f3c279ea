import { Kysely, PostgresDialect } from 'kysely'
import pg from 'pg'
import type { Database } from './database'

// pg returns int8 (OID 20) and numeric (1700) as strings by default; our counts and sequence
// numbers fit in a double, so parse them as numbers once, here.
pg.types.setTypeParser(20, (v) => Number(v))
pg.types.setTypeParser(1700, (v) => Number(v))

export function createPool(connectionString: string, max = 10): pg.Pool {
  const pool = new pg.Pool({ connectionString, max, idleTimeoutMillis: 30_000, connectionTimeoutMillis: 5_000 })
  // A dropped idle connection (database restart) must not crash the process; the pool replaces it.
  pool.on('error', (err) => console.warn(`[db] idle connection error: ${err.message}`))
  return pool
}

export function createDb(pool: pg.Pool): Kysely<Database> {
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool }) })
}
