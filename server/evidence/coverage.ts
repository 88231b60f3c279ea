import type { ConditionStats, Range, ReadingCoverage } from './types'

// Pure summaries over readings: the conditions during a span (min / max / mean per quantity) and how
// completely a period is covered by readings (row count against 1 Hz, and the gaps). No I/O.

/** One calibrated reading as the evidence code uses it; SI units, null = not measured. */
export interface EnvPoint {
  /** Epoch ms. */
  t: number
  airTempC: number | null
  rhPct: number | null
  panelTempC: number | null
  airflowMps: number | null
  dewPointC: number | null
}

class Acc {
  n = 0
  min = Infinity
  max = -Infinity
  sum = 0
  add(v: number | null) {
    if (v === null || !Number.isFinite(v)) return
    this.n++
    if (v < this.min) this.min = v
    if (v > this.max) this.max = v
    this.sum += v
  }
  range(): Range | null {
    return this.n ? { min: this.min, max: this.max, mean: this.sum / this.n } : null
  }
}

/** Dew-point margin (surface − dew point, °C) of a reading: the panel when measured, else the air. */
export function marginOf(p: Pick<EnvPoint, 'panelTempC' | 'airTempC' | 'dewPointC'>): number | null {
  const surface = p.panelTempC ?? p.airTempC
  if (surface === null || p.dewPointC === null) return null
  const m = surface - p.dewPointC
  return Number.isFinite(m) ? m : null
}

/**
 * Conditions over [fromMs, toMs) from time-ordered points (a plain mean of the readings: at a steady
 * 1 Hz that is the time mean). Points outside the span are skipped.
 */
export function conditionStats(points: readonly EnvPoint[], fromMs: number, toMs: number): ConditionStats {
  const air = new Acc()
  const rh = new Acc()
  const panel = new Acc()
  const margin = new Acc()
  const flow = new Acc()
  let n = 0
  for (const p of points) {
    if (p.t < fromMs || p.t >= toMs) continue
    n++
    air.add(p.airTempC)
    rh.add(p.rhPct)
    panel.add(p.panelTempC)
    flow.add(p.airflowMps)
    margin.add(marginOf(p))
  }
  return { n, airTempC: air.range(), rhPct: rh.range(), panelTempC: panel.range(), dewPointMarginC: margin.range(), airflowMps: flow.range() }
}

const MINUTE = 60_000

/** Shortest run of minutes without a reading that the report lists as a gap. */
export const MIN_GAP_MINUTES = 5

/** The whole minutes of [fromMs, toMs): minutes cut by the period's ends count as covered. */
export function wholeMinutes(fromMs: number, toMs: number): { first: number; last: number } {
  return { first: Math.ceil(fromMs / MINUTE) * MINUTE, last: Math.floor(toMs / MINUTE) * MINUTE }
}

/**
 * Coverage of [fromMs, toMs) by readings: `rows` against one per second, and the runs of at least
 * `minGapMinutes` whole minutes with no reading (`gaps`, epoch ms, found from the rollups by the caller
 * within wholeMinutes(fromMs, toMs)).
 */
export function readingCoverage(rows: number, gaps: readonly { from: number; to: number }[], fromMs: number, toMs: number, minGapMinutes = MIN_GAP_MINUTES): ReadingCoverage {
  const expectedRows = Math.max(0, Math.floor((toMs - fromMs) / 1000))
  return {
    rows,
    expectedRows,
    ratio: expectedRows ? rows / expectedRows : rows ? 1 : 0,
    gaps: gaps.map((g) => ({ from: new Date(g.from).toISOString(), to: new Date(g.to).toISOString(), minutes: (g.to - g.from) / MINUTE })),
    minGapMinutes,
  }
}

/** Evenly thinned copy of at most `max` items (charts need no more points than pixels). */
export function thin<T>(items: readonly T[], max: number): T[] {
  if (items.length <= max) return [...items]
  const step = items.length / max
  return Array.from({ length: max }, (_, i) => items[Math.floor(i * step)]!)
}
