// One booth's watches: routes each reading and timer tick to the rules, tracks the booth mode, and turns the
// engines' events into alert events. Per reading the work is O(number of rules) with a few small objects made;
// all state is plain JSON (snapshot/restore) so a restarted ingest resumes exactly where it stopped.

import { checkBake, createBakeState, endBake, startBake, stepBake, type BakeRule, type BakeState } from './bake'
import { createCusumState, stepCusum, type CusumParams, type CusumState } from './cusum'
import { bakeMessage, cusumMessage, silenceMessage, thresholdMessage } from './message'
import {
  channelValue,
  hasAnyValue,
  isBoothMode,
  type BoothMode,
  type WatchChannel,
  type WatchReading,
} from './reading'
import type { WatchKind, WatchRule } from './rules'
import { checkSilence, createSilenceState, markSeen, type SilenceRule, type SilenceState } from './silence'
import {
  createSubgroupState,
  flushSubgroup,
  stepSubgroup,
  type SubgroupParams,
  type SubgroupState,
} from './subgroup'
import {
  createThresholdState,
  forceClearThreshold,
  resetPending,
  stepThreshold,
  type ThresholdRule,
  type ThresholdState,
} from './threshold'

export interface WatchEvent {
  ruleId: string
  kind: WatchKind
  type: 'open' | 'clear'
  at: number
  /** In the channel's unit (silence: milliseconds). Null when the event was not caused by a value (a rule that
   * stopped applying, a bake that ended, a bake with no temperature data). */
  value: number | null
  /** The limit crossed; for rh_cusum the target μ0, for sensor_silence silentAfterMs, for a bake its target. */
  limit: number | null
  /** Worst value of the excursion (silence: the gap; rh_cusum: the most extreme subgroup mean). */
  peak: number | null
  message: string
}

export type WatchRuleState =
  | { engine: 'threshold'; threshold: ThresholdState }
  | { engine: 'silence'; silence: SilenceState }
  | { engine: 'bake'; bake: BakeState }
  | { engine: 'cusum'; cusum: CusumState; subgroup: SubgroupState }

export interface BoothEvaluatorSnapshot {
  version: 1
  /** Time of the last reading accepted; earlier readings are dropped as late. */
  lastT: number | null
  mode: BoothMode | null
  /** By rule id. A rule missing here (or of another engine) restarts from a fresh state. */
  rules: Record<string, WatchRuleState>
}

export interface BoothEvaluator {
  onReading(reading: WatchReading): readonly WatchEvent[]
  onTick(nowMs: number): readonly WatchEvent[]
  snapshot(): BoothEvaluatorSnapshot
  restore(snapshot: unknown): void
}

export interface BoothEvaluatorOptions {
  /** Arms the silence watches from this time, for sensors that never report at all. */
  startMs?: number
  /** Mode to assume until a reading reports one; null (default) = unknown, so mode-bound rules wait. */
  initialMode?: BoothMode | null
}

type Emit = (e: Omit<WatchEvent, 'ruleId' | 'kind'>) => void

// One rule bound to its engine. Every hook sees the current mode; an unknown mode (null) makes every mode-bound
// rule inactive, so a booth that never reports its mode raises no spray-only alerts.
interface Watch {
  readonly rule: WatchRule
  modeChanged(prev: BoothMode | null, next: BoothMode | null, t: number): void
  reading(reading: WatchReading, mode: BoothMode | null): void
  tick(nowMs: number, mode: BoothMode | null): void
  save(): WatchRuleState
  load(state: unknown): void
}

const NO_EVENTS: readonly WatchEvent[] = Object.freeze([])

function isActive(modes: readonly BoothMode[] | null, mode: BoothMode | null): boolean {
  return modes === null || (mode !== null && modes.includes(mode))
}

// ---- restore guards: a snapshot comes back from storage, so every field is checked, never trusted.

type Obj = Record<string, unknown>
const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v)
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v)
const isNumOrNull = (v: unknown): v is number | null => v === null || isNum(v)

function loadThreshold(v: unknown): ThresholdState | null {
  if (!isObj(v) || !isNumOrNull(v.pendingSince) || !isNumOrNull(v.openedAt) || !isNumOrNull(v.peak)) return null
  const side = v.side === 'low' || v.side === 'high' ? v.side : v.side === null ? null : undefined
  if (side === undefined) return null
  if (v.openedAt !== null && (side === null || v.peak === null)) return null
  return { pendingSince: v.pendingSince, side, openedAt: v.openedAt, peak: v.peak }
}

function loadSilence(v: unknown): SilenceState | null {
  if (!isObj(v) || !isNumOrNull(v.lastSeenMs) || typeof v.open !== 'boolean') return null
  return { lastSeenMs: v.lastSeenMs, open: v.open }
}

function loadBake(v: unknown): BakeState | null {
  if (!isObj(v) || !isNumOrNull(v.startedAt) || !isNumOrNull(v.maxC)) return null
  if (typeof v.reached !== 'boolean' || typeof v.open !== 'boolean') return null
  return { startedAt: v.startedAt, maxC: v.maxC, reached: v.reached, open: v.open }
}

function loadCusum(v: unknown): CusumState | null {
  if (!isObj(v) || !isNum(v.hi) || !isNum(v.lo) || v.hi < 0 || v.lo < 0 || !isNumOrNull(v.peak)) return null
  const open = v.open === 'high' || v.open === 'low' ? v.open : v.open === null ? null : undefined
  if (open === undefined || (open !== null && v.peak === null)) return null
  return { hi: v.hi, lo: v.lo, open, peak: v.peak }
}

function loadSubgroup(v: unknown): SubgroupState | null {
  if (!isObj(v) || !isNumOrNull(v.window) || !isNum(v.sum) || !isNum(v.count) || v.count < 0) return null
  return { window: v.window, sum: v.sum, count: v.count }
}

function stateOf(v: unknown, engine: WatchRuleState['engine']): Obj | null {
  return isObj(v) && v.engine === engine ? v : null
}

// ---- one adapter per engine

function thresholdWatch(
  rule: WatchRule,
  emit: Emit,
  channel: WatchChannel,
  band: ThresholdRule,
  modes: readonly BoothMode[] | null,
): Watch {
  let s = createThresholdState()
  const relay = (ev: ReturnType<typeof stepThreshold>['event'], mode: BoothMode | null) => {
    if (ev) emit({ type: ev.type, at: ev.at, value: ev.value, limit: ev.limit, peak: ev.peak, message: thresholdMessage(rule.kind, channel, ev, mode) })
  }
  return {
    rule,
    modeChanged(prev, next, t) {
      if (!isActive(modes, prev) || isActive(modes, next)) return
      const step = forceClearThreshold(band, s, t)
      s = step.state
      relay(step.event, next)
    },
    reading(reading, mode) {
      if (!isActive(modes, mode)) return
      const step = stepThreshold(band, s, { t: reading.t, value: channelValue(reading, channel) })
      s = step.state
      relay(step.event, mode)
    },
    tick() {},
    save: () => ({ engine: 'threshold', threshold: { ...s } }),
    load(v) {
      s = loadThreshold(stateOf(v, 'threshold')?.threshold) ?? createThresholdState()
    },
  }
}

function silenceWatch(
  rule: WatchRule,
  emit: Emit,
  channel: WatchChannel | 'any',
  params: SilenceRule,
  startMs: number | null,
): Watch {
  let s = createSilenceState(startMs)
  const relay = (ev: ReturnType<typeof checkSilence>['event']) => {
    if (ev) emit({ type: ev.type, at: ev.at, value: ev.value, limit: ev.limit, peak: ev.peak, message: silenceMessage(channel, ev) })
  }
  return {
    rule,
    modeChanged() {},
    reading(reading) {
      const seen = channel === 'any' ? hasAnyValue(reading) : channelValue(reading, channel) !== null
      if (!seen) return
      const step = markSeen(params, s, reading.t)
      s = step.state
      relay(step.event)
    },
    tick(nowMs) {
      const step = checkSilence(params, s, nowMs)
      s = step.state
      relay(step.event)
    },
    save: () => ({ engine: 'silence', silence: { ...s } }),
    load(v) {
      s = loadSilence(stateOf(v, 'silence')?.silence) ?? createSilenceState(startMs)
    },
  }
}

function bakeWatch(rule: WatchRule, emit: Emit, channel: WatchChannel, params: BakeRule): Watch {
  let s = createBakeState()
  const relay = (ev: ReturnType<typeof stepBake>['event']) => {
    if (ev) emit({ type: ev.type, at: ev.at, value: ev.value, limit: ev.limit, peak: ev.peak, message: bakeMessage(channel, ev) })
  }
  return {
    rule,
    modeChanged(prev, next, t) {
      if (prev === 'bake') {
        const step = endBake(params, s, t)
        s = step.state
        relay(step.event)
      }
      if (next === 'bake') s = startBake(s, t)
    },
    reading(reading, mode) {
      if (mode !== 'bake') return
      const step = stepBake(params, s, { t: reading.t, value: channelValue(reading, channel) })
      s = step.state
      relay(step.event)
    },
    tick(nowMs, mode) {
      if (mode !== 'bake') return
      const step = checkBake(params, s, nowMs)
      s = step.state
      relay(step.event)
    },
    save: () => ({ engine: 'bake', bake: { ...s } }),
    load(v) {
      s = loadBake(stateOf(v, 'bake')?.bake) ?? createBakeState()
    },
  }
}

function cusumWatch(
  rule: WatchRule,
  emit: Emit,
  channel: WatchChannel,
  params: CusumParams,
  group: SubgroupParams,
  modes: readonly BoothMode[] | null,
): Watch {
  let s = createCusumState()
  let g = createSubgroupState()
  const relay = (ev: ReturnType<typeof stepCusum>['event'], at: number) => {
    if (!ev) return
    emit({
      type: ev.type,
      at,
      value: ev.value,
      limit: params.target,
      peak: ev.peak,
      message: cusumMessage(channel, ev, params.target, group.periodMs),
    })
  }
  const feed = (closed: ReturnType<typeof stepSubgroup>['closed']) => {
    if (!closed) return
    const step = stepCusum(params, s, closed.mean)
    s = step.state
    relay(step.event, closed.at)
  }
  return {
    rule,
    modeChanged(prev, next) {
      if (!isActive(modes, prev) || isActive(modes, next)) return
      // A subgroup never mixes readings from different modes. The sums and an open drift alert hold while the
      // booth bakes or stands idle: a drifting air supply is still drifting after a bake, so the alert clears only
      // when readings in the watched modes show the humidity back at its target.
      g = createSubgroupState()
    },
    reading(reading, mode) {
      if (!isActive(modes, mode)) return
      const step = stepSubgroup(group, g, reading.t, channelValue(reading, channel))
      g = step.state
      feed(step.closed)
    },
    tick(nowMs, mode) {
      if (!isActive(modes, mode)) return
      const step = flushSubgroup(group, g, nowMs)
      g = step.state
      feed(step.closed)
    },
    save: () => ({ engine: 'cusum', cusum: { ...s }, subgroup: { ...g } }),
    load(v) {
      const o = stateOf(v, 'cusum')
      const cs = loadCusum(o?.cusum)
      const gs = loadSubgroup(o?.subgroup)
      s = cs && gs ? cs : createCusumState()
      g = cs && gs ? gs : createSubgroupState()
    },
  }
}

function watchFor(rule: WatchRule, emit: Emit, startMs: number | null): Watch {
  const timing = { openAfterMs: rule.openAfterMs, clearAfterMs: rule.clearAfterMs, hysteresis: rule.hysteresis }
  switch (rule.kind) {
    case 'rh_band':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, low: rule.params.lowPct, high: rule.params.highPct }, rule.activeWhen)
    case 'air_temp_band':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, low: rule.params.lowC, high: rule.params.highC }, rule.activeWhen)
    case 'dew_point_margin':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, low: rule.params.minC }, rule.activeWhen)
    case 'airflow_min_in_spray':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, low: rule.params.minMps }, ['spray'])
    case 'booth_pressure_band':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, low: rule.params.lowPa, high: rule.params.highPa }, rule.activeWhen)
    case 'filter_dp_max':
      return thresholdWatch(rule, emit, rule.channel, { ...timing, high: rule.params.maxPa }, rule.activeWhen ?? null)
    case 'sensor_silence':
      return silenceWatch(rule, emit, rule.channel, { silentAfterMs: rule.params.silentAfterMs }, startMs)
    case 'bake_not_reaching_temp':
      return bakeWatch(rule, emit, rule.channel, { targetC: rule.params.targetC, withinMs: rule.params.withinMs })
    case 'rh_cusum': {
      const p = rule.params
      return cusumWatch(
        rule,
        emit,
        rule.channel,
        { target: p.targetPct, sigma: p.sigmaPct, k: p.k, h: p.h, clearFraction: p.clearFraction, capSigma: p.capSigma },
        { periodMs: p.subgroupMs, minCount: p.minSubgroupCount },
        rule.activeWhen,
      )
    }
  }
}

/**
 * rules: validated rules (WatchRuleSchema). Disabled rules are skipped; of rules sharing an id only the first is
 * used, since state is keyed by id. Readings must be for this booth; one older than the last accepted is dropped.
 */
export function createBoothEvaluator(rules: readonly WatchRule[], options: BoothEvaluatorOptions = {}): BoothEvaluator {
  const startMs = options.startMs !== undefined && Number.isFinite(options.startMs) ? options.startMs : null
  // Events are collected only when there are some: the common case returns the shared empty array.
  let out: WatchEvent[] | null = null
  const ids = new Set<string>()
  const watches: Watch[] = []
  for (const rule of rules) {
    if (!rule.enabled || ids.has(rule.id)) continue
    ids.add(rule.id)
    const emit: Emit = (e) => {
      ;(out ??= []).push({ ruleId: rule.id, kind: rule.kind, ...e })
    }
    watches.push(watchFor(rule, emit, startMs))
  }
  let lastT: number | null = null
  let mode: BoothMode | null = options.initialMode ?? null
  const collect = (): readonly WatchEvent[] => {
    const events = out ?? NO_EVENTS
    out = null
    return events
  }

  return {
    onReading(reading) {
      const t = reading.t
      if (!Number.isFinite(t) || (lastT !== null && t < lastT)) return NO_EVENTS
      lastT = t
      const prev = mode
      if (isBoothMode(reading.mode)) mode = reading.mode
      const next = mode
      for (const w of watches) {
        if (prev !== next) w.modeChanged(prev, next, t)
        w.reading(reading, next)
        // Timers also run on readings, so deadlines hold even when ticks are sparse.
        w.tick(t, next)
      }
      return collect()
    },
    onTick(nowMs) {
      if (!Number.isFinite(nowMs)) return NO_EVENTS
      for (const w of watches) w.tick(nowMs, mode)
      return collect()
    },
    snapshot() {
      const states: Record<string, WatchRuleState> = {}
      for (const w of watches) states[w.rule.id] = w.save()
      return { version: 1, lastT, mode, rules: states }
    },
    restore(snapshot) {
      const snap = isObj(snapshot) && snapshot.version === 1 ? snapshot : null
      lastT = snap && isNum(snap.lastT) ? snap.lastT : null
      if (!snap) mode = options.initialMode ?? null
      else mode = isBoothMode(snap.mode) ? snap.mode : null
      const states = snap && isObj(snap.rules) ? snap.rules : {}
      for (const w of watches) w.load(Object.hasOwn(states, w.rule.id) ? states[w.rule.id] : undefined)
    },
  }
}
