import { sql, type Kysely } from 'kysely'
import { CHANNELS } from '../db/channels'
import type { Database } from '../db/database'

type Db = Kysely<Database>

export const SERIES_CHANNELS = [...CHANNELS.map((c) => c.column), 'dew_point_c'] as const
export type SeriesChannel = (typeof SERIES_CHANNELS)[number]

export interface SeriesPoint {
  t: Date
  values: Record<SeriesChannel, number | null>
}

/** Raw rows in [from, to), time-ordered. */
export async function rawSeries(db: Db, boothId: number, from: Date, to: Date): Promise<SeriesPoint[]> {
  const rows = await db
    .selectFrom('readings')
    .select(['ts', ...SERIES_CHANNELS])
    .where('booth_id', '=', boothId)
    .where('ts', '>=', from)
    .where('ts', '<', to)
    .orderBy('ts')
    .execute()
  return rows.map((r) => ({ t: r.ts, values: Object.fromEntries(SERIES_CHANNELS.map((c) => [c, r[c]])) as SeriesPoint['values'] }))
}

/** Means over buckets of `bucketSec` seconds computed from raw rows (for short ranges). */
export async function bucketedRawSeries(db: Db, boothId: number, from: Date, to: Date, bucketSec: number): Promise<SeriesPoint[]> {
  const cols = SERIES_CHANNELS.map((c) => `avg(${c})::real AS ${c}`).join(', ')
  const res = await sql<Record<SeriesChannel, number | null> & { t: Date }>`
    SELECT date_bin(${`${bucketSec} seconds`}::interval, ts, ${from}::timestamptz) AS t, ${sql.raw(cols)}
    FROM readings WHERE booth_id = ${boothId} AND ts >= ${from} AND ts < ${to}
    GROUP BY 1 ORDER BY 1`.execute(db)
  return res.rows.map((r) => ({ t: r.t, values: Object.fromEntries(SERIES_CHANNELS.map((c) => [c, r[c]])) as SeriesPoint['values'] }))
}

/** Means over buckets of whole minutes from the per-minute rollups (for long ranges). */
export async function rollupSeries(db: Db, boothId: number, from: Date, to: Date, bucketSec: number): Promise<SeriesPoint[]> {
  const cols = SERIES_CHANNELS.map((c) => `(sum(${c}_sum) / nullif(sum(${c}_n), 0))::real AS ${c}`).join(', ')
  const res = await sql<Record<SeriesChannel, number | null> & { t: Date }>`
    SELECT date_bin(${`${bucketSec} seconds`}::interval, minute, ${from}::timestamptz) AS t, ${sql.raw(cols)}
    FROM readings_minute WHERE booth_id = ${boothId} AND minute >= ${from} AND minute < ${to}
    GROUP BY 1 ORDER BY 1`.execute(db)
  return res.rows.map((r) => ({ t: r.t, values: Object.fromEntries(SERIES_CHANNELS.map((c) => [c, r[c]])) as SeriesPoint['values'] }))
}
