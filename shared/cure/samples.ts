// Reading series and the shared zero-order-hold walker used by flash, pot life and cure credit.
// Times are epoch milliseconds; rates are dimensionless multipliers of wall-clock minutes.

import { isFiniteNumber } from './guards'

/** One booth reading. Missing channels are undefined or null; non-finite values are ignored. */
export interface Sample {
  /** Epoch milliseconds. */
  t: number
  airTempC?: number | null
  rhPct?: number | null
  panelTempC?: number | null
  airflowMps?: number | null
}

export const SAMPLE_CHANNELS = ['airTempC', 'rhPct', 'panelTempC', 'airflowMps'] as const
export type SampleChannel = (typeof SAMPLE_CHANNELS)[number]

/** The value of each channel held at some instant; null when nothing usable is held. */
export type HeldValues = Record<SampleChannel, number | null>

/** A reading is held for at most this long across a gap (2 min: our own choice, a few missed 1 Hz–0.1 Hz messages). */
export const DEFAULT_MAX_HOLD_MS = 120_000
export const MS_PER_MINUTE = 60_000

export interface HoldOptions {
  /** How long (ms, ≥ 0, may be Infinity) a reading is held across a gap. Default 120 000. */
  maxHoldMs?: number
}

/** An interval [startMs, endMs) over which every channel's held value is constant. */
export interface HeldSegment {
  startMs: number
  endMs: number
  values: HeldValues
}

export interface HeldSeries {
  segments: HeldSegment[]
  /** Values held at nowMs itself (a reading stamped exactly nowMs counts). */
  atNow: HeldValues
}

/** Reads `maxHoldMs` from an options object; NaN when the options are malformed. */
export function readMaxHold(options: unknown): number {
  if (options === undefined) return DEFAULT_MAX_HOLD_MS
  if (typeof options !== 'object' || options === null) return Number.NaN
  const v = (options as { maxHoldMs?: unknown }).maxHoldMs
  if (v === undefined) return DEFAULT_MAX_HOLD_MS
  return typeof v === 'number' && v >= 0 ? v : Number.NaN // NaN fails `>= 0`; +Infinity is allowed
}

/** Just the hold option out of a caller's options: {} when absent, null when the options are not an object. */
export function holdOptionsOf(options: unknown): HoldOptions | null {
  if (options === undefined) return {}
  if (typeof options !== 'object' || options === null || Array.isArray(options)) return null
  return { maxHoldMs: (options as { maxHoldMs?: number }).maxHoldMs }
}

function emptyValues(): HeldValues {
  return { airTempC: null, rhPct: null, panelTempC: null, airflowMps: null }
}

interface ChannelTrack {
  ts: number[]
  vs: number[]
  i: number // index of the last reading at or before the walk's current time, −1 if none
}

/**
 * Splits [startMs, nowMs] into intervals of constant held values (zero-order hold).
 * A reading at time t is held on [t, t + maxHoldMs) or until the channel's next reading; readings before
 * startMs supply the starting value under the same rule; readings after nowMs are ignored. Input may be
 * unsorted (a sorted copy is used; equal times keep input order, the later one wins) and non-finite values
 * are ignored per channel. Returns null on invalid input (non-array samples, non-finite or reversed times,
 * bad maxHoldMs). Never throws.
 */
export function holdSegments(
  samples: readonly Sample[],
  startMs: number,
  nowMs: number,
  options?: HoldOptions,
): HeldSeries | null {
  const maxHold = readMaxHold(options)
  if (!Array.isArray(samples) || !isFiniteNumber(startMs) || !isFiniteNumber(nowMs)) return null
  if (nowMs < startMs || Number.isNaN(maxHold)) return null

  const usable: Sample[] = []
  for (const s of samples as readonly unknown[]) {
    if (typeof s === 'object' && s !== null && isFiniteNumber((s as Sample).t) && (s as Sample).t <= nowMs) {
      usable.push(s as Sample)
    }
  }
  usable.sort((a, b) => a.t - b.t) // Array.prototype.sort is stable (ES2019)

  const tracks = {} as Record<SampleChannel, ChannelTrack>
  const breaks: number[] = [startMs, nowMs]
  for (const ch of SAMPLE_CHANNELS) {
    const track: ChannelTrack = { ts: [], vs: [], i: -1 }
    for (const s of usable) {
      const v: unknown = s[ch]
      if (!isFiniteNumber(v)) continue
      track.ts.push(s.t)
      track.vs.push(v)
      if (s.t > startMs && s.t < nowMs) breaks.push(s.t)
      const expiry = s.t + maxHold
      if (expiry > startMs && expiry < nowMs) breaks.push(expiry)
    }
    tracks[ch] = track
  }
  breaks.sort((a, b) => a - b)

  const valuesAt = (at: number): HeldValues => {
    const out = emptyValues()
    for (const ch of SAMPLE_CHANNELS) {
      const tr = tracks[ch]
      while (tr.i + 1 < tr.ts.length && (tr.ts[tr.i + 1] as number) <= at) tr.i++
      if (tr.i < 0) continue
      const t = tr.ts[tr.i] as number
      if (at - t < maxHold) out[ch] = tr.vs[tr.i] as number
    }
    return out
  }

  const segments: HeldSegment[] = []
  for (let k = 0; k + 1 < breaks.length; k++) {
    const a = breaks[k] as number
    const b = breaks[k + 1] as number
    if (b > a) segments.push({ startMs: a, endMs: b, values: valuesAt(a) })
  }
  return { segments, atNow: valuesAt(nowMs) }
}

/** Rate as a function of held values. Return NaN (or anything non-finite / negative) for "no usable data". */
export type RateFn = (values: HeldValues) => number

export interface IntegrateOptions extends HoldOptions {
  /** Integral levels (rate-minutes) whose first crossing time is wanted. */
  targets?: readonly number[]
  /**
   * Rate to count while there is no usable data, given the last usable rate (null if none yet).
   * Absent: nothing accrues in gaps. Pot life uses it to stay on the safe side.
   */
  gapRate?: (lastRate: number | null) => number
}

export interface Integration {
  valid: boolean
  /** ∫ r dt over [startMs, nowMs], in (rate ×) minutes. */
  integral: number
  /** Milliseconds of the interval with no usable data. */
  uncoveredMs: number
  /** True when part of the interval, or "now", had no usable data. */
  uncertain: boolean
  /** Rate from the values held at nowMs; NaN when none are usable. */
  rateNow: number
  /** Last usable rate seen in the walk (including now); null if none. */
  lastRate: number | null
  /** Epoch ms at which the integral first reached each target (exact within the hold model), else null. */
  crossings: (number | null)[]
}

function usableRate(r: number): boolean {
  return Number.isFinite(r) && r >= 0
}

/**
 * ∫ rate dt over [startMs, nowMs] in minutes, on zero-order-held readings (see holdSegments).
 * Beyond the hold nothing accrues (unless options.gapRate says otherwise) and the result is uncertain.
 * The rate function is called in time order. Invalid input → valid false, NaN numbers. Never throws.
 */
export function integrateRate(
  samples: readonly Sample[],
  startMs: number,
  nowMs: number,
  rate: RateFn,
  options?: IntegrateOptions,
): Integration {
  const rawTargets: unknown = typeof options === 'object' && options !== null ? options.targets : undefined
  const targets: readonly unknown[] = Array.isArray(rawTargets) ? rawTargets : []
  const invalid: Integration = {
    valid: false,
    integral: Number.NaN,
    uncoveredMs: Number.NaN,
    uncertain: true,
    rateNow: Number.NaN,
    lastRate: null,
    crossings: targets.map(() => null),
  }
  if (typeof rate !== 'function') return invalid
  if (rawTargets !== undefined && !Array.isArray(rawTargets)) return invalid
  const gapRate = typeof options === 'object' && options !== null ? options.gapRate : undefined
  if (gapRate !== undefined && typeof gapRate !== 'function') return invalid
  const series = holdSegments(samples, startMs, nowMs, options)
  if (series === null) return invalid

  const crossings: (number | null)[] = targets.map((x) => (isFiniteNumber(x) && x <= 0 ? startMs : null))
  let integral = 0
  let uncoveredMs = 0
  let lastRate: number | null = null
  for (const seg of series.segments) {
    let r = rate(seg.values)
    if (usableRate(r)) {
      lastRate = r
    } else {
      uncoveredMs += seg.endMs - seg.startMs
      r = gapRate ? gapRate(lastRate) : 0
      if (!usableRate(r)) r = 0
    }
    if (r === 0) continue
    const before = integral
    integral += (r * (seg.endMs - seg.startMs)) / MS_PER_MINUTE
    targets.forEach((x, k) => {
      if (crossings[k] === null && isFiniteNumber(x) && x <= integral) {
        crossings[k] = Math.min(seg.endMs, seg.startMs + ((x - before) / r) * MS_PER_MINUTE)
      }
    })
  }
  const now = rate(series.atNow)
  const rateNow = usableRate(now) ? now : Number.NaN
  if (!Number.isNaN(rateNow)) lastRate = rateNow
  return {
    valid: true,
    integral,
    uncoveredMs,
    uncertain: uncoveredMs > 0 || Number.isNaN(rateNow),
    rateNow,
    lastRate,
    crossings,
  }
}

/**
 * When a level is reached: the exact crossing if already reached, else now + remaining / rate (never in the
 * past); null when the rate is zero / unknown. `remaining` and the result of `rate × minutes` share units.
 */
export function projectCrossing(
  crossing: number | null,
  nowMs: number,
  remaining: number,
  rateNow: number,
): number | null {
  if (crossing !== null) return crossing
  if (!(rateNow > 0) || !Number.isFinite(rateNow) || !(remaining >= 0)) return null
  return nowMs + (remaining / rateNow) * MS_PER_MINUTE
}
