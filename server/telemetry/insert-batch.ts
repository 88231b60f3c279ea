import type pg from 'pg'
import { ROLLUP_CHANNELS } from '../db/channels'
import type { ReadingRow } from './reading-row'

// One statement per batch: insert the readings (a redelivered booth + timestamp is skipped) and fold
// only the rows actually inserted into the per-minute rollups, so a retry never double-counts.
const rollupCols = ROLLUP_CHANNELS.flatMap((c) => [`${c}_min`, `${c}_max`, `${c}_sum`, `${c}_n`])
const rollupSelect = ROLLUP_CHANNELS.map((c) => `min(${c}), max(${c}), sum(${c}), count(${c})`).join(', ')
const rollupUpdate = ROLLUP_CHANNELS.map(
  (c) => `${c}_min = least(m.${c}_min, excluded.${c}_min),
    ${c}_max = greatest(m.${c}_max, excluded.${c}_max),
    ${c}_sum = CASE WHEN excluded.${c}_n = 0 THEN m.${c}_sum ELSE coalesce(m.${c}_sum, 0) + excluded.${c}_sum END,
    ${c}_n = m.${c}_n + excluded.${c}_n`,
).join(',\n    ')

const SQL = `
WITH ins AS (
  INSERT INTO readings (booth_id, ts, received_at, device_id, seq, air_temp_c, rh_pct, panel_temp_c, airflow_mps,
    booth_dp_pa, intake_filter_dp_pa, exhaust_filter_dp_pa, heater_on, dew_point_c)
  SELECT * FROM unnest($1::int[], $2::timestamptz[], $3::timestamptz[], $4::text[], $5::int8[], $6::real[], $7::real[],
    $8::real[], $9::real[], $10::real[], $11::real[], $12::real[], $13::bool[], $14::real[])
  ON CONFLICT (booth_id, ts) DO NOTHING
  RETURNING *
), up AS (
  INSERT INTO readings_minute AS m (booth_id, minute, n, ${rollupCols.join(', ')})
  SELECT booth_id, date_trunc('minute', ts), count(*), ${rollupSelect} FROM ins GROUP BY 1, 2
  ON CONFLICT (booth_id, minute) DO UPDATE SET n = m.n + excluded.n,
    ${rollupUpdate}
  RETURNING 1
)
SELECT (SELECT count(*) FROM ins) AS inserted`

/** Inserts a batch; returns how many rows were new. */
export async function insertReadingBatch(client: pg.Pool | pg.PoolClient, rows: readonly ReadingRow[]): Promise<number> {
  const n = rows.length
  const cols: unknown[][] = Array.from({ length: 14 }, () => new Array<unknown>(n))
  for (let i = 0; i < n; i++) {
    const r = rows[i]!
    cols[0]![i] = r.boothId
    cols[1]![i] = new Date(r.tsMs).toISOString()
    cols[2]![i] = new Date(r.receivedMs).toISOString()
    cols[3]![i] = r.deviceId
    cols[4]![i] = r.seq
    cols[5]![i] = r.airTempC
    cols[6]![i] = r.rhPct
    cols[7]![i] = r.panelTempC
    cols[8]![i] = r.airflowMps
    cols[9]![i] = r.boothDpPa
    cols[10]![i] = r.intakeFilterDpPa
    cols[11]![i] = r.exhaustFilterDpPa
    cols[12]![i] = r.heaterOn
    cols[13]![i] = r.dewPointC
  }
  const res = await client.query<{ inserted: number }>(SQL, cols)
  return Number(res.rows[0]?.inserted ?? 0)
}
