// Bake onset and end from heater + panel temperature, for booths whose controller does not report its mode.
// One reading at a time, O(1) per reading (it runs on the ingest path through a hook).
//
//   start: the heater has been on for at least minOnMs and the panel (else air) temperature has risen at least
//          riseK above its value when the heater came on → a bake that started when the heater came on;
//   end:   the heater has been off for at least minOffMs and the panel is back within coolBackK of where it
//          started, or the heater has been off for maxCoolMs whatever the temperature → ends at that reading.
// Readings without a heater value (a dropout) change nothing. Thresholds are our working choices.

export interface OnsetRule {
  minOnMs: number
  riseK: number
  minOffMs: number
  coolBackK: number
  maxCoolMs: number
}

export const DEFAULT_ONSET_RULE: Readonly<OnsetRule> = Object.freeze({
  minOnMs: 2 * 60_000,
  riseK: 3,
  minOffMs: 5 * 60_000,
  coolBackK: 8,
  maxCoolMs: 45 * 60_000,
})

export interface OnsetState {
  /** When the heater came on (current run), null when off. */
  onSince: number | null
  tempAtOn: number | null
  offSince: number | null
  baking: boolean
  bakeStartMs: number | null
  tempAtStart: number | null
  lastT: number | null
}

export interface OnsetReading {
  t: number
  heaterOn: boolean | null | undefined
  panelTempC?: number | null
  airTempC?: number | null
}

export type OnsetEvent = { type: 'start'; at: number } | { type: 'end'; at: number }

export function createOnsetState(): OnsetState {
  return { onSince: null, tempAtOn: null, offSince: null, baking: false, bakeStartMs: null, tempAtStart: null, lastT: null }
}

/** A bake already running (e.g. opened by a tech, or found at start-up): the end rule applies to it. */
export function markBaking(state: OnsetState, startMs: number, tempC: number | null = null): OnsetState {
  return { ...state, baking: true, bakeStartMs: startMs, tempAtStart: tempC ?? state.tempAtStart }
}

export function markNotBaking(state: OnsetState): OnsetState {
  return { ...state, baking: false, bakeStartMs: null, tempAtStart: null }
}

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x)

export function stepOnset(rule: OnsetRule, state: OnsetState, r: OnsetReading): { state: OnsetState; event?: OnsetEvent } {
  if (!finite(r.t) || (state.lastT !== null && r.t < state.lastT)) return { state }
  const temp = finite(r.panelTempC) ? r.panelTempC : finite(r.airTempC) ? r.airTempC : null
  const s: OnsetState = { ...state, lastT: r.t }
  if (r.heaterOn === true) {
    s.offSince = null
    if (s.onSince === null) {
      s.onSince = r.t
      s.tempAtOn = temp
    } else if (s.tempAtOn === null && temp !== null) s.tempAtOn = temp
    if (!s.baking && s.tempAtOn !== null && temp !== null && r.t - s.onSince >= rule.minOnMs && temp - s.tempAtOn >= rule.riseK) {
      s.baking = true
      s.bakeStartMs = s.onSince
      s.tempAtStart = s.tempAtOn
      return { state: s, event: { type: 'start', at: s.onSince } }
    }
    return { state: s }
  }
  if (r.heaterOn === false) {
    s.onSince = null
    s.tempAtOn = null
    if (s.offSince === null) s.offSince = r.t
    if (s.baking) {
      const offFor = r.t - s.offSince
      const cooled = temp !== null && s.tempAtStart !== null && temp <= s.tempAtStart + rule.coolBackK
      if ((offFor >= rule.minOffMs && cooled) || offFor >= rule.maxCoolMs) {
        return { state: markNotBaking(s), event: { type: 'end', at: r.t } }
      }
    }
  }
  return { state: s }
}
