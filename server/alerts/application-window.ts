// The application window of the product a job step is applying (TDS temperature and humidity limits), watched
// like a band: open after it has been outside for a while, clear with hysteresis. Pure: the runtime feeds it.
//
// Applies while a job step is active (the jobs code sets and clears the limits) and the booth is not baking or
// cooling: the TDS window is about applying, and a bake drives temperature up and humidity down on purpose.

import { z } from 'zod'
import {
  createThresholdState,
  forceClearThreshold,
  stepThreshold,
  type BoothMode,
  type ThresholdEvent,
  type ThresholdRule,
  type ThresholdState,
} from '#shared/watch'
import { APPLICATION_WINDOW_KIND, formatAlertValue } from './kinds'

export interface ApplicationWindowLimits {
  minTempC?: number
  maxTempC?: number
  minRhPct?: number
  maxRhPct?: number
}

const limit = (what: string, min: number, max: number) =>
  z.number({ error: `${what} must be a number` }).min(min, `${what} must be at least ${min}`).max(max, `${what} must be at most ${max}`).optional()

export const ApplicationWindowSchema = z
  .object({
    minTempC: limit('minTempC', -40, 150),
    maxTempC: limit('maxTempC', -40, 150),
    minRhPct: limit('minRhPct', 0, 100),
    maxRhPct: limit('maxRhPct', 0, 100),
  })
  .refine((l) => l.minTempC === undefined || l.maxTempC === undefined || l.minTempC <= l.maxTempC, {
    message: 'minTempC must not be above maxTempC',
    path: ['minTempC'],
  })
  .refine((l) => l.minRhPct === undefined || l.maxRhPct === undefined || l.minRhPct <= l.maxRhPct, {
    message: 'minRhPct must not be above maxRhPct',
    path: ['minRhPct'],
  })

export const APPLICATION_WINDOW_RULES = {
  temp: 'application-window-temp',
  rh: 'application-window-rh',
} as const

// A door opening or a short gust must not raise it; a minute outside while applying is worth a word.
export const APPLICATION_WINDOW_TIMING = {
  openAfterMs: 60_000,
  clearAfterMs: 30_000,
  hysteresis: { temp: 0.5, rh: 1 },
} as const

export interface AppWindowEvent {
  ruleId: string
  kind: typeof APPLICATION_WINDOW_KIND
  channel: 'airTempC' | 'rhPct'
  type: 'open' | 'clear'
  at: number
  value: number | null
  limit: number | null
  peak: number | null
  message: string
}

export interface AppWindowSnapshot {
  limits: ApplicationWindowLimits | null
  temp: ThresholdState
  rh: ThresholdState
}

const INACTIVE_MODES: readonly BoothMode[] = ['bake', 'cool']

type Part = 'temp' | 'rh'
const CHANNEL: Record<Part, 'airTempC' | 'rhPct'> = { temp: 'airTempC', rh: 'rhPct' }

function ruleOf(limits: ApplicationWindowLimits | null, part: Part): ThresholdRule | null {
  if (!limits) return null
  const low = part === 'temp' ? limits.minTempC : limits.minRhPct
  const high = part === 'temp' ? limits.maxTempC : limits.maxRhPct
  if (low === undefined && high === undefined) return null
  return {
    low: low ?? null,
    high: high ?? null,
    openAfterMs: APPLICATION_WINDOW_TIMING.openAfterMs,
    clearAfterMs: APPLICATION_WINDOW_TIMING.clearAfterMs,
    hysteresis: APPLICATION_WINDOW_TIMING.hysteresis[part],
  }
}

function message(part: Part, ev: ThresholdEvent): string {
  const channel = CHANNEL[part]
  const what = part === 'temp' ? 'air temperature' : 'relative humidity'
  const fmt = (v: number | null) => formatAlertValue(APPLICATION_WINDOW_KIND, channel, v)
  if (ev.type === 'open') {
    const bound = ev.side === 'high' ? 'maximum' : 'minimum'
    return `Outside the product's application window: ${what} ${fmt(ev.value)}, ${ev.side === 'high' ? 'above' : 'below'} the data sheet's ${fmt(ev.limit)} ${bound}`
  }
  if (ev.value === null) return `Application window no longer watched (job step ended or booth left painting); worst ${what} ${fmt(ev.peak)}`
  return `Back inside the application window: ${what} ${fmt(ev.value)} (worst ${fmt(ev.peak)})`
}

function isThresholdState(v: unknown): v is ThresholdState {
  if (typeof v !== 'object' || v === null) return false
  const o = v as Record<string, unknown>
  const numOrNull = (x: unknown) => x === null || (typeof x === 'number' && Number.isFinite(x))
  return numOrNull(o.pendingSince) && numOrNull(o.openedAt) && numOrNull(o.peak) && (o.side === null || o.side === 'low' || o.side === 'high')
}

export class ApplicationWindowWatch {
  private limits: ApplicationWindowLimits | null = null
  private state: Record<Part, ThresholdState> = { temp: createThresholdState(), rh: createThresholdState() }

  get current(): ApplicationWindowLimits | null {
    return this.limits
  }

  /** New limits (or null when the job step ends). An alert whose bound went away clears at once. */
  set(limits: ApplicationWindowLimits | null, at: number): AppWindowEvent[] {
    const out: AppWindowEvent[] = []
    const next = limits && Object.values(limits).some((v) => v !== undefined) ? { ...limits } : null
    for (const part of ['temp', 'rh'] as const) {
      const before = ruleOf(this.limits, part)
      const after = ruleOf(next, part)
      if (before && !after) this.forceClear(part, before, at, out)
      else if (after && before && (before.low !== after.low || before.high !== after.high) && this.state[part].openedAt === null) {
        this.state[part] = createThresholdState()
      }
    }
    this.limits = next
    return out
  }

  reading(r: { t: number; airTempC?: number | null; rhPct?: number | null }, mode: BoothMode | null): readonly AppWindowEvent[] {
    if (!this.limits) return NONE
    let out: AppWindowEvent[] | null = null
    const inactive = mode !== null && INACTIVE_MODES.includes(mode)
    for (const part of ['temp', 'rh'] as const) {
      const rule = ruleOf(this.limits, part)
      if (!rule) continue
      if (inactive) {
        if (this.state[part].openedAt !== null || this.state[part].pendingSince !== null) this.forceClear(part, rule, r.t, (out ??= []))
        continue
      }
      const step = stepThreshold(rule, this.state[part], { t: r.t, value: part === 'temp' ? r.airTempC : r.rhPct })
      this.state[part] = step.state
      if (step.event) (out ??= []).push(this.toEvent(part, step.event))
    }
    return out ?? NONE
  }

  snapshot(): AppWindowSnapshot {
    return { limits: this.limits, temp: { ...this.state.temp }, rh: { ...this.state.rh } }
  }

  restore(v: unknown): void {
    if (typeof v !== 'object' || v === null) return
    const o = v as Record<string, unknown>
    const parsed = o.limits === null || o.limits === undefined ? null : ApplicationWindowSchema.safeParse(o.limits)
    this.limits = parsed && parsed.success ? parsed.data : null
    this.state = {
      temp: isThresholdState(o.temp) ? { ...o.temp } : createThresholdState(),
      rh: isThresholdState(o.rh) ? { ...o.rh } : createThresholdState(),
    }
  }

  private forceClear(part: Part, rule: ThresholdRule, at: number, out: AppWindowEvent[]): void {
    const step = forceClearThreshold(rule, this.state[part], at)
    this.state[part] = step.state
    if (step.event) out.push(this.toEvent(part, step.event))
  }

  private toEvent(part: Part, ev: ThresholdEvent): AppWindowEvent {
    return {
      ruleId: APPLICATION_WINDOW_RULES[part],
      kind: APPLICATION_WINDOW_KIND,
      channel: CHANNEL[part],
      type: ev.type,
      at: ev.at,
      value: ev.value,
      limit: ev.limit,
      peak: Number.isFinite(ev.peak) ? ev.peak : null,
      message: message(part, ev),
    }
  }
}

const NONE: readonly AppWindowEvent[] = Object.freeze([])
