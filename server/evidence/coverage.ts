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

/**
 * Coverage of [fromMs, toMs) by readings: `rows` against one per second, and the runs of at least
 * `minGapMinutes` whole minutes with no reading, from the minutes that have one (epoch ms of each
 * minute's start, any order). Minutes cut by the period's ends count as covered.
 */
export function readingCoverage(rows: number, presentMinutes: Iterable<number>, fromMs: number, toMs: number, minGapMinutes = 5): ReadingCoverage {
  const expectedRows = Math.max(0, Math.floor((toMs - fromMs) / 1000))
  const present = new Set<number>()
  for (const m of presentMinutes) present.add(Math.floor(m / MINUTE) * MINUTE)
  const gaps: ReadingCoverage['gaps'] = []
  const first = Math.ceil(fromMs / MINUTE) * MINUTE
  const last = Math.floor(toMs / MINUTE) * MINUTE // minutes starting before this are whole inside the period
  let runStart: number | null = null
  const close = (end: number) => {
    if (runStart === null) return
    const minutes = (end - runStart) / MINUTE
    if (minutes >= minGapMinutes) gaps.push({ from: new Date(runStart).toISOString(), to: new Date(end).toISOString(), minutes })
    runStart = null
  }
  for (let m = first; m < last; m += MINUTE) {
    if (present.has(m)) close(m)
    else runStart ??= m
  }
  close(last)
  return { rows, expectedRows, ratio: expectedRows ? rows / expectedRows : rows ? 1 : 0, gaps, minGapMinutes }
}

/** Evenly thinned copy of at most `max` items (charts need no more points than pixels). */
export function thin<T>(items: readonly T[], max: number): T[] {
  if (items.length <= max) return [...items]
  const step = items.length / max
  return Array.from({ length: max }, (_, i) => items[Math.floor(i * step)]!)
}
