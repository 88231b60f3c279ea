// Tabular (decision-interval) CUSUM for slow drift of a process mean.
//
// Source: NIST/SEMATECH e-Handbook of Statistical Methods, section 6.3.2.3 "CUSUM Control Charts", tabular form:
//   S_hi(i) = max(0, S_hi(i−1) + x_i − μ0 − kσ)
//   S_lo(i) = max(0, S_lo(i−1) + μ0 − kσ − x_i)         with S_hi(0) = S_lo(0) = 0
// and a signal when either sum exceeds hσ. x, μ0, σ and the sums are in the unit of the data (here %RH); k and h
// are in σ units. σ is the standard deviation of what is fed in — for subgroup means, of the means (see subgroup.ts).
//
// k = 0.5 is the usual choice: it tunes the chart to detect a shift of 2k = 1σ fastest.
// h = 5 rather than 4: with k = 0.5 the in-control average run length (subgroups between false alarms) of one side
// is about 930 at h = 5 against about 336 at h = 4 (ARL table in the same handbook, 6.3.2.3.1), so about 465 against
// 168 for the two-sided chart, while a 1σ shift is still caught in about 10 subgroups instead of about 8. (Figures
// recalled from the published tables and rounded.) With 1-minute subgroups that is one false alarm per ≈ 7.75 h of
// watched booth time instead of ≈ 2.8 h: a humidity drift is never urgent to the minute, and painters stop reading
// alerts that cry wolf.
//
// Alert life cycle: opens when a sum first exceeds hσ (side 'high' or 'low'); the sums keep accumulating while open
// (as in the handbook's table); clears when the open side's sum falls to clearFraction·hσ (default 0: back to zero),
// and then both sums restart from zero. capSigma (optional) bounds each sum at capSigma·σ so that after a long
// excursion the alert clears within about (capSigma − clearFraction·h)/k subgroups of the process returning to μ0,
// instead of staying open for as long as the drift lasted.

export type CusumSide = 'high' | 'low'

export interface CusumParams {
  /** μ0, the target mean, in data units. */
  target: number
  /** σ of the values fed in, in data units; must be > 0. */
  sigma: number
  /** Allowance in σ units (default 0.5). */
  k?: number
  /** Decision interval in σ units (default 5, see above). */
  h?: number
  /** Clear when the open side's sum is ≤ clearFraction·hσ (default 0). */
  clearFraction?: number
  /** Upper bound for each sum in σ units; null/undefined = unbounded (the handbook's form). */
  capSigma?: number | null
}

export interface CusumState {
  hi: number
  lo: number
  open: CusumSide | null
  /** While open: the most extreme value fed in on the open side. */
  peak: number | null
}

export interface CusumEvent {
  type: 'open' | 'clear'
  side: CusumSide
  /** The value that caused the event; null when the clear was forced. */
  value: number | null
  /** The open side's sum at the event, in data units (before the reset on clear). */
  sum: number
  peak: number
}

export interface CusumStep {
  state: CusumState
  event?: CusumEvent
}

export interface CusumPoint {
  x: number
  hi: number
  lo: number
  open: CusumSide | null
  event?: CusumEvent
}

export const CUSUM_DEFAULT_K = 0.5
export const CUSUM_DEFAULT_H = 5

export function createCusumState(): CusumState {
  return { hi: 0, lo: 0, open: null, peak: null }
}

function finiteOr(v: number | null | undefined, fallback: number): number {
  return typeof v === 'number' && Number.isFinite(v) ? v : fallback
}

export function stepCusum(params: CusumParams, state: CusumState, x: number | null | undefined): CusumStep {
  const { target, sigma } = params
  if (typeof x !== 'number' || !Number.isFinite(x)) return { state }
  if (!Number.isFinite(target) || !Number.isFinite(sigma) || sigma <= 0) return { state }
  const k = Math.max(0, finiteOr(params.k, CUSUM_DEFAULT_K))
  const limit = finiteOr(params.h, CUSUM_DEFAULT_H) * sigma
  const cap = params.capSigma == null || !Number.isFinite(params.capSigma) ? Infinity : params.capSigma * sigma

  let hi = Math.min(cap, Math.max(0, state.hi + x - target - k * sigma))
  let lo = Math.min(cap, Math.max(0, state.lo + target - k * sigma - x))

  if (state.open === null) {
    const side: CusumSide | null = hi > limit && hi >= lo ? 'high' : lo > limit ? 'low' : null
    if (side === null) return { state: { hi, lo, open: null, peak: null } }
    return {
      state: { hi, lo, open: side, peak: x },
      event: { type: 'open', side, value: x, sum: side === 'high' ? hi : lo, peak: x },
    }
  }

  const side = state.open
  const prevPeak = state.peak ?? x
  const peak = side === 'high' ? Math.max(prevPeak, x) : Math.min(prevPeak, x)
  const own = side === 'high' ? hi : lo
  const other = side === 'high' ? lo : hi
  const clearAt = Math.max(0, finiteOr(params.clearFraction, 0)) * limit
  if (own <= clearAt) {
    return { state: createCusumState(), event: { type: 'clear', side, value: x, sum: own, peak } }
  }
  if (other > limit) {
    // The process swung past the other limit before this side cleared: clear this side (resetting only its sum)
    // and let the next value open the other side, so there is never more than one event per step.
    if (side === 'high') hi = 0
    else lo = 0
    return { state: { hi, lo, open: null, peak: null }, event: { type: 'clear', side, value: x, sum: own, peak } }
  }
  return { state: { hi, lo, open: side, peak } }
}

/** Batch form over a whole series, built on stepCusum so both agree. Non-finite values repeat the last sums. */
export function cusumSeries(params: CusumParams, xs: readonly number[]): CusumPoint[] {
  let state = createCusumState()
  const out: CusumPoint[] = []
  for (const x of xs) {
    const step = stepCusum(params, state, x)
    state = step.state
    const point: CusumPoint = { x, hi: state.hi, lo: state.lo, open: state.open }
    if (step.event) point.event = step.event
    out.push(point)
  }
  return out
}
