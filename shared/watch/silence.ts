// Sensor silence: no reading for silentAfterMs opens an alert; the next reading clears it.
//
// Events carry durations in milliseconds: value = how long it has been silent (open) or the length of the gap
// (clear), limit = silentAfterMs, peak = value.

export interface SilenceRule {
  silentAfterMs: number
}

export interface SilenceState {
  /** Last reading seen, or the time watching started; null = nothing to measure silence from yet. */
  lastSeenMs: number | null
  open: boolean
}

export interface SilenceEvent {
  type: 'open' | 'clear'
  at: number
  value: number
  limit: number
  peak: number
}

export interface SilenceStep {
  state: SilenceState
  event?: SilenceEvent
}

/** startMs arms the watch for a sensor that never reports at all (e.g. the time the evaluator was created). */
export function createSilenceState(startMs: number | null = null): SilenceState {
  return { lastSeenMs: startMs !== null && Number.isFinite(startMs) ? startMs : null, open: false }
}

function limitOf(rule: SilenceRule): number {
  return Number.isFinite(rule.silentAfterMs) && rule.silentAfterMs > 0 ? rule.silentAfterMs : 0
}

/** Timer check: opens once silence has lasted silentAfterMs; clears if lastSeenMs has since moved on. */
export function checkSilence(rule: SilenceRule, state: SilenceState, nowMs: number): SilenceStep {
  if (!Number.isFinite(nowMs) || state.lastSeenMs === null) return { state }
  const limit = limitOf(rule)
  // A zero limit would fire between any two readings: treat it as "rule off".
  if (limit === 0) return { state }
  const silentFor = nowMs - state.lastSeenMs
  if (!state.open && silentFor >= limit) {
    return { state: { ...state, open: true }, event: { type: 'open', at: nowMs, value: silentFor, limit, peak: silentFor } }
  }
  if (state.open && silentFor < limit) {
    return { state: { ...state, open: false }, event: { type: 'clear', at: nowMs, value: silentFor, limit, peak: silentFor } }
  }
  return { state }
}

/** A reading arrived at t: records it and clears an open alert, reporting the gap. */
export function markSeen(rule: SilenceRule, state: SilenceState, t: number): SilenceStep {
  if (!Number.isFinite(t)) return { state }
  if (state.lastSeenMs !== null && t < state.lastSeenMs) return { state }
  const next: SilenceState = { lastSeenMs: t, open: false }
  if (!state.open) return { state: next }
  const gap = state.lastSeenMs === null ? 0 : t - state.lastSeenMs
  return { state: next, event: { type: 'clear', at: t, value: gap, limit: limitOf(rule), peak: gap } }
}
