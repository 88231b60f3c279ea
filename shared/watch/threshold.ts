// Threshold watch: a band [low, high] (either side optional) with an open delay, a clear delay and hysteresis.
//
// Opens when the value has been outside the band continuously for openAfterMs; clears when it has been back inside
// the band by at least `hysteresis` (units of the channel) continuously for clearAfterMs. The delays stop a door
// opening or one noisy sample from raising an alert; the hysteresis stops a value sitting on the limit from
// opening and clearing over and over. "Continuously" is judged on the readings that arrive: a gap in the data
// (null/NaN) neither starts nor breaks a period — sensor silence is its own watch.
//
// Readings must come in time order (the evaluator drops late ones).

export type ThresholdSide = 'low' | 'high'

export interface ThresholdRule {
  low?: number | null
  high?: number | null
  openAfterMs: number
  clearAfterMs: number
  hysteresis: number
}

export interface ThresholdState {
  /** While closed: start of the current excursion. While open: start of the current recovery. */
  pendingSince: number | null
  /** Side of the pending excursion, or of the open alert. */
  side: ThresholdSide | null
  /** Non-null exactly when the alert is open. */
  openedAt: number | null
  /** Worst value since the excursion began, pending or open (highest for 'high', lowest for 'low'). */
  peak: number | null
}

export interface ThresholdEvent {
  type: 'open' | 'clear'
  at: number
  /** Null when the clear was forced (rule no longer active), not caused by a reading. */
  value: number | null
  /** The limit that was crossed; null if the rule lost that bound while the alert was open. */
  limit: number | null
  peak: number
  side: ThresholdSide
  /** Open: when the excursion began. Clear: when the alert opened. */
  since: number
}

export interface ThresholdStep {
  state: ThresholdState
  event?: ThresholdEvent
}

const CLOSED: ThresholdState = Object.freeze({ pendingSince: null, side: null, openedAt: null, peak: null })

export function createThresholdState(): ThresholdState {
  return { ...CLOSED }
}

function bound(v: number | null | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null
}

function nonNegative(v: number): number {
  return Number.isFinite(v) && v > 0 ? v : 0
}

function worst(side: ThresholdSide, prev: number | null, value: number): number {
  if (prev === null) return value
  return side === 'high' ? Math.max(prev, value) : Math.min(prev, value)
}

/** Which side of the band the value is on (on the limit counts as inside), or null when inside. */
function outside(low: number | null, high: number | null, value: number): ThresholdSide | null {
  if (high !== null && value > high) return 'high'
  if (low !== null && value < low) return 'low'
  return null
}

export function stepThreshold(
  rule: ThresholdRule,
  state: ThresholdState,
  reading: { t: number; value: number | null | undefined },
): ThresholdStep {
  const { t, value } = reading
  if (!Number.isFinite(t) || typeof value !== 'number' || !Number.isFinite(value)) return { state }
  const low = bound(rule.low)
  const high = bound(rule.high)

  if (state.openedAt === null) {
    const side = outside(low, high, value)
    if (side === null) return { state: state.pendingSince === null ? state : createThresholdState() }
    // A switch from one side to the other starts a new excursion.
    const same = state.pendingSince !== null && state.side === side
    const since = same ? (state.pendingSince ?? t) : t
    const peak = worst(side, same ? state.peak : null, value)
    if (t - since >= nonNegative(rule.openAfterMs)) {
      const limit = side === 'high' ? high : low
      return {
        state: { pendingSince: null, side, openedAt: t, peak },
        event: { type: 'open', at: t, value, limit, peak, side, since },
      }
    }
    if (same && peak === state.peak) return { state }
    return { state: { pendingSince: since, side, openedAt: null, peak } }
  }

  const side: ThresholdSide = state.side ?? 'high'
  const peak = worst(side, state.peak, value)
  // Hysteresis is capped at half the band so the clear band [low + hy, high − hy] is never empty.
  let hy = nonNegative(rule.hysteresis)
  if (low !== null && high !== null) hy = Math.min(hy, Math.max(0, (high - low) / 2))
  // Recovered means inside the whole clear band: an alert opened high does not clear by falling below low.
  const recovered = (low === null || value >= low + hy) && (high === null || value <= high - hy)
  if (!recovered) {
    if (state.pendingSince === null && peak === state.peak) return { state }
    return { state: { ...state, pendingSince: null, peak } }
  }
  const since = state.pendingSince ?? t
  if (t - since >= nonNegative(rule.clearAfterMs)) {
    return {
      state: createThresholdState(),
      event: { type: 'clear', at: t, value, limit: side === 'high' ? high : low, peak, side, since: state.openedAt },
    }
  }
  if (since === state.pendingSince && peak === state.peak) return { state }
  return { state: { ...state, pendingSince: since, peak } }
}

/**
 * The caller's rule just became inactive (e.g. its activeWhen no longer matches the booth mode): a pending
 * excursion or recovery is dropped, so time spent while inactive never counts towards opening or clearing.
 * An open alert stays open; close it with forceClearThreshold if it should end.
 */
export function resetPending(state: ThresholdState): ThresholdState {
  if (state.pendingSince === null) return state
  return state.openedAt === null ? createThresholdState() : { ...state, pendingSince: null }
}

/** Ends an open alert without a reading (the rule stopped applying). No event when nothing was open. */
export function forceClearThreshold(rule: ThresholdRule, state: ThresholdState, at: number): ThresholdStep {
  if (state.openedAt === null) return { state: resetPending(state) }
  const side: ThresholdSide = state.side ?? 'high'
  return {
    state: createThresholdState(),
    event: {
      type: 'clear',
      at,
      value: null,
      limit: side === 'high' ? bound(rule.high) : bound(rule.low),
      peak: state.peak ?? Number.NaN,
      side,
      since: state.openedAt,
    },
  }
}
