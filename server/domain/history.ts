import type { Kysely } from 'kysely'
import { dewPointMarginC } from '#shared/cure/psychrometrics'
import type { Database } from '../db/database'
import { bucketedRawSeries, rawSeries, rollupSeries, SERIES_CHANNELS, type SeriesPoint } from '../repositories/readings'
import { calibrateSeriesPoints } from './calibration'

// History for charts: raw rows for short ranges, buckets for longer ones, so an answer carries at
// most MAX_POINTS points per channel whatever the range.
export const MAX_POINTS = 3_000
export const MAX_RANGE_DAYS = 400

export type Resolution = 'raw' | 'raw-buckets' | 'minute-buckets'

/** Chooses how to read a range: readings arrive at about 1 Hz, rollups are per minute. */
export function chooseResolution(rangeMs: number): { resolution: Resolution; bucketSec: number } {
  const bucketSec = Math.ceil(rangeMs / 1000 / MAX_POINTS)
  if (bucketSec <= 1) return { resolution: 'raw', bucketSec: 1 }
  // From ~17 h up (20 s buckets), whole-minute rollups still keep the budget and read 60× fewer rows.
  if (bucketSec < 20) return { resolution: 'raw-buckets', bucketSec }
  return { resolution: 'minute-buckets', bucketSec: Math.ceil(bucketSec / 60) * 60 }
}

const CAMEL: Record<(typeof SERIES_CHANNELS)[number], string> = {
  air_temp_c: 'airTempC',
  rh_pct: 'rhPct',
  panel_temp_c: 'panelTempC',
  airflow_mps: 'airflowMps',
  booth_dp_pa: 'boothDpPa',
  intake_filter_dp_pa: 'intakeFilterDpPa',
  exhaust_filter_dp_pa: 'exhaustFilterDpPa',
  dew_point_c: 'dewPointC',
}

export async function boothHistory(db: Kysely<Database>, boothId: number, from: Date, to: Date) {
  const { resolution, bucketSec } = chooseResolution(to.getTime() - from.getTime())
  let points: SeriesPoint[]
  if (resolution === 'raw') points = await rawSeries(db, boothId, from, to)
  else if (resolution === 'raw-buckets') points = await bucketedRawSeries(db, boothId, from, to, bucketSec)
  else points = await rollupSeries(db, boothId, from, to, bucketSec)
  // A burst faster than 1 Hz could exceed the budget in raw mode: thin it evenly.
  if (points.length > MAX_POINTS) {
    const step = points.length / MAX_POINTS
    points = Array.from({ length: MAX_POINTS }, (_, i) => points[Math.floor(i * step)]!)
  }
  // Sensor calibration offsets apply at read time, from their effective time on; stored rows stay raw.
  points = await calibrateSeriesPoints(db, boothId, points)
  const series: Record<string, (number | null)[]> = {}
  for (const c of SERIES_CHANNELS) series[CAMEL[c]] = points.map((p) => p.values[c])
  series.dewPointMarginC = points.map((p) => {
    const surface = p.values.panel_temp_c ?? p.values.air_temp_c
    const dp = p.values.dew_point_c
    if (surface === null || dp === null) return null
    const m = dewPointMarginC(surface, dp)
    return Number.isFinite(m) ? Math.round(m * 100) / 100 : null
  })
  return {
    boothId,
    from: from.toISOString(),
    to: to.toISOString(),
    resolution,
    bucketSeconds: bucketSec,
    count: points.length,
    t: points.map((p) => p.t.toISOString()),
    series,
  }
}
