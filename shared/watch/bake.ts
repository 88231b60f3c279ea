// Bake not reaching temperature: once a bake starts, the watched temperature must reach targetC within withinMs.
//
// Opens at the deadline if the target has not been reached (also when no temperature arrived at all: value null);
// clears when the target is reached, or when the bake ends. Once reached, the watch rests until the next bake —
// a later dip is a different question (cure credit, DESIGN.md §6, accounts for the time actually spent hot).

export interface BakeRule {
  targetC: number
  withinMs: number
}

export interface BakeState {
  /** Start of the current bake; null when not baking. */
  startedAt: number | null
  /** Highest temperature seen during this bake. */
  maxC: number | null
  reached: boolean
  open: boolean
}

export interface BakeEvent {
  type: 'open' | 'clear'
  at: number
  /** Open: the highest temperature so far (null = no data). Clear: the reading that reached the target, or null
   * when the bake ended first. */
  value: number | null
  limit: number
  peak: number | null
  /** Start of the bake. */
  since: number
}

export interface BakeStep {
  state: BakeState
  event?: BakeEvent
}

const IDLE: BakeState = Object.freeze({ startedAt: null, maxC: null, reached: false, open: false })

export function createBakeState(): BakeState {
  return { ...IDLE }
}

export function startBake(state: BakeState, t: number): BakeState {
  if (!Number.isFinite(t) || state.startedAt !== null) return state
  return { startedAt: t, maxC: null, reached: false, open: false }
}

export function endBake(rule: BakeRule, state: BakeState, t: number): BakeStep {
  if (state.startedAt === null) return { state }
  if (!state.open) return { state: createBakeState() }
  return {
    state: createBakeState(),
    event: { type: 'clear', at: t, value: null, limit: rule.targetC, peak: state.maxC, since: state.startedAt },
  }
}

/** A temperature reading during the bake. */
export function stepBake(rule: BakeRule, state: BakeState, reading: { t: number; value: number | null | undefined }): BakeStep {
  const { t, value } = reading
  if (state.startedAt === null || state.reached) return { state }
  if (!Number.isFinite(t) || typeof value !== 'number' || !Number.isFinite(value)) return { state }
  const maxC = state.maxC === null ? value : Math.max(state.maxC, value)
  if (!(value >= rule.targetC)) return { state: maxC === state.maxC ? state : { ...state, maxC } }
  const next: BakeState = { ...state, maxC, reached: true, open: false }
  if (!state.open) return { state: next }
  return {
    state: next,
    event: { type: 'clear', at: t, value, limit: rule.targetC, peak: maxC, since: state.startedAt },
  }
}

/** Timer check: opens once the deadline has passed without reaching the target. */
export function checkBake(rule: BakeRule, state: BakeState, nowMs: number): BakeStep {
  if (state.startedAt === null || state.reached || state.open || !Number.isFinite(nowMs)) return { state }
  const within = Number.isFinite(rule.withinMs) && rule.withinMs > 0 ? rule.withinMs : 0
  if (nowMs - state.startedAt < within) return { state }
  return {
    state: { ...state, open: true },
    event: { type: 'open', at: nowMs, value: state.maxC, limit: rule.targetC, peak: state.maxC, since: state.startedAt },
  }
}
