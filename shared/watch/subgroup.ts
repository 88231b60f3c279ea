// Resampling readings into subgroup means (e.g. 1 Hz humidity → 1-minute means) before they enter the CUSUM.
//
// Why: the CUSUM's false-alarm rate assumes independent values around μ0. Consecutive 1 Hz readings are not
// independent — a humidity sensor's response time and the booth's air-handling cycles keep neighbouring readings
// on the same side of the mean for tens of seconds — so fed raw, the sums climb on noise alone and the chart fires
// far more often than its nominal run length says. Means over windows much longer than that correlation are close
// to independent, and averaging n readings also shrinks their noise. σ given to the CUSUM must then be the
// standard deviation of the subgroup means (estimated from the booth's own history of means), not of raw readings.
//
// Windows are aligned on multiples of periodMs since the epoch, so a restart mid-window resumes the same window.
// A window closes when a reading falls in a later window (or a timer flushes it after its end). A window with
// fewer than minCount readings is dropped: its mean is noisier than the σ the CUSUM was set up for.

export interface SubgroupParams {
  periodMs: number
  minCount: number
}

export interface SubgroupState {
  /** Index of the current window (floor(t / periodMs)), or null before any reading. count 0 = already flushed. */
  window: number | null
  sum: number
  count: number
}

export interface Subgroup {
  mean: number
  /** End of the window, epoch ms. */
  at: number
  count: number
}

export interface SubgroupStep {
  state: SubgroupState
  closed?: Subgroup
}

export function createSubgroupState(): SubgroupState {
  return { window: null, sum: 0, count: 0 }
}

function periodOf(params: SubgroupParams): number {
  return Number.isFinite(params.periodMs) && params.periodMs > 0 ? params.periodMs : 0
}

function close(params: SubgroupParams, state: SubgroupState, period: number): Subgroup | undefined {
  if (state.window === null || state.count === 0) return undefined
  const minCount = Number.isFinite(params.minCount) ? Math.max(1, params.minCount) : 1
  if (state.count < minCount) return undefined
  return { mean: state.sum / state.count, at: (state.window + 1) * period, count: state.count }
}

export function stepSubgroup(
  params: SubgroupParams,
  state: SubgroupState,
  t: number,
  x: number | null | undefined,
): SubgroupStep {
  if (!Number.isFinite(t) || typeof x !== 'number' || !Number.isFinite(x)) return { state }
  const period = periodOf(params)
  // No period: every reading is its own subgroup.
  if (period === 0) return { state, closed: { mean: x, at: t, count: 1 } }
  const window = Math.floor(t / period)
  if (state.window === null) return { state: { window, sum: x, count: 1 } }
  if (window < state.window) return { state } // late reading for a window already closed
  if (window === state.window) {
    if (state.count === 0) return { state } // this window was already flushed by the timer
    return { state: { window, sum: state.sum + x, count: state.count + 1 } }
  }
  const closed = close(params, state, period)
  const next: SubgroupState = { window, sum: x, count: 1 }
  return closed ? { state: next, closed } : { state: next }
}

/** Timer: closes the open window once nowMs is past its end, so the last subgroup is not held back for ever. */
export function flushSubgroup(params: SubgroupParams, state: SubgroupState, nowMs: number): SubgroupStep {
  const period = periodOf(params)
  if (state.window === null || period === 0 || !Number.isFinite(nowMs)) return { state }
  if (nowMs < (state.window + 1) * period) return { state }
  if (state.count === 0) return { state }
  // Keep the window index with no readings, so a reading still stamped inside it is not counted twice.
  const next: SubgroupState = { window: state.window, sum: 0, count: 0 }
  const closed = close(params, state, period)
  return closed ? { state: next, closed } : { state: next }
}
