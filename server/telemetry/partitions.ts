import type pg from 'pg'

// Daily partitions of readings: made ahead of time, dropped past the retention period.
const DAY = 86_400_000

function dayStart(ms: number): Date {
  const d = new Date(ms)
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()))
}

export function partitionName(day: Date): string {
  return `readings_${day.toISOString().slice(0, 10).replace(/-/g, '')}`
}

/** Creates every missing daily partition that overlaps [fromMs, toMs]. Safe to run concurrently. */
export async function ensurePartitions(pool: pg.Pool, fromMs: number, toMs: number): Promise<number> {
  let made = 0
  for (let day = dayStart(fromMs).getTime(); day <= toMs; day += DAY) {
    const start = new Date(day)
    const name = partitionName(start)
    const exists = await pool.query('SELECT 1 FROM pg_class WHERE relname = $1', [name])
    if (exists.rowCount) continue
    try {
      await pool.query(
        `CREATE TABLE IF NOT EXISTS ${name} PARTITION OF readings FOR VALUES FROM ('${start.toISOString()}') TO ('${new Date(day + DAY).toISOString()}')`,
      )
      made++
    } catch (e) {
      // Another instance made it at the same moment.
      const code = (e as { code?: string }).code
      if (code !== '42P07' && code !== '23505') throw e
    }
  }
  return made
}

/** Drops partitions that end before now − retention. Returns the dropped names. */
export async function dropExpiredPartitions(pool: pg.Pool, nowMs: number, retentionDays: number): Promise<string[]> {
  const cutoff = dayStart(nowMs - retentionDays * DAY)
  const res = await pool.query<{ name: string }>(
    `SELECT c.relname AS name FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid
     JOIN pg_class p ON p.oid = i.inhparent WHERE p.relname = 'readings'`,
  )
  const dropped: string[] = []
  for (const { name } of res.rows) {
    const m = /^readings_(\d{4})(\d{2})(\d{2})$/.exec(name)
    if (!m) continue
    const day = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]))
    if (day + DAY <= cutoff.getTime()) {
      await pool.query(`DROP TABLE IF EXISTS ${name}`)
      dropped.push(name)
    }
  }
  if (dropped.length) await pool.query('DELETE FROM readings_minute WHERE minute < $1', [cutoff.toISOString()])
  return dropped
}
