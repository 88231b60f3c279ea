import { afterEach, describe, expect, it, vi } from 'vitest'
import fc from 'fast-check'
import {
  firstEscalationAt,
  parseQuietHours,
  planEscalation,
  planOpenings,
  quietState,
  retryDelayMs,
  uniqueRecipients,
  watchKey,
  type PlanAlert,
  type PlanConfig,
  type PlanContext,
} from '../../../server/alerts/plan'

const S = 1000
const MIN = 60 * S
const at = (iso: string) => Date.parse(iso)

const cfg = (over: Partial<PlanConfig> = {}): PlanConfig => ({
  rateLimitMs: 10 * MIN,
  digestAfter: 3,
  digestWindowMs: MIN,
  quietHours: null,
  escalateAfterMs: 15 * MIN,
  escalateMax: 3,
  ...over,
})

let nextId = 1
const alert = (over: Partial<PlanAlert> = {}): PlanAlert => ({
  id: nextId++,
  boothId: 1,
  ruleId: `rule-${nextId}`,
  severity: 'warning',
  state: 'open',
  notifyState: 'pending',
  timeZone: 'UTC',
  ...over,
})

const ctx = (now: number, over: Partial<PlanContext> = {}): PlanContext => ({
  now,
  lastNotified: new Map(),
  recentSends: [],
  digestDueAt: null,
  ...over,
})

describe('quiet hours', () => {
  it('parses HH:MM-HH:MM and turns empty, equal or invalid text into "none"', () => {
    expect(parseQuietHours('22:00-06:00')).toEqual({ startMin: 22 * 60, endMin: 6 * 60 })
    expect(parseQuietHours('9:30 – 17:00')).toEqual({ startMin: 9 * 60 + 30, endMin: 17 * 60 })
    expect(parseQuietHours('')).toBeNull()
    expect(parseQuietHours(undefined)).toBeNull()
    expect(parseQuietHours('06:00-06:00')).toBeNull()
    expect(parseQuietHours('25:00-06:00')).toBeNull()
    expect(parseQuietHours('22:00')).toBeNull()
  })

  it('spans midnight: quiet from 22:00 to 06:00, with the end time of this night', () => {
    const q = parseQuietHours('22:00-06:00')
    expect(quietState(at('2026-03-10T21:59:59Z'), q, 'UTC')).toEqual({ quiet: false })
    expect(quietState(at('2026-03-10T22:00:00Z'), q, 'UTC')).toEqual({ quiet: true, endsAt: at('2026-03-11T06:00:00Z') })
    expect(quietState(at('2026-03-10T23:30:15.250Z'), q, 'UTC')).toEqual({ quiet: true, endsAt: at('2026-03-11T06:00:00Z') })
    expect(quietState(at('2026-03-11T05:59:30Z'), q, 'UTC')).toEqual({ quiet: true, endsAt: at('2026-03-11T06:00:00Z') })
    expect(quietState(at('2026-03-11T06:00:00Z'), q, 'UTC')).toEqual({ quiet: false })
    expect(quietState(at('2026-03-11T12:00:00Z'), q, 'UTC')).toEqual({ quiet: false })
  })

  it('follows the local clock of the time zone (Berlin is UTC+1 in winter)', () => {
    const q = parseQuietHours('22:00-06:00')
    // 21:30 UTC = 22:30 in Berlin: quiet until 06:00 Berlin = 05:00 UTC.
    expect(quietState(at('2026-01-15T21:30:00Z'), q, 'Europe/Berlin')).toEqual({ quiet: true, endsAt: at('2026-01-16T05:00:00Z') })
    expect(quietState(at('2026-01-15T20:30:00Z'), q, 'Europe/Berlin')).toEqual({ quiet: false })
    // An unknown zone counts as UTC rather than failing.
    expect(quietState(at('2026-01-15T21:30:00Z'), q, 'Not/AZone')).toEqual({ quiet: false })
  })

  it('handles a daytime period that does not span midnight', () => {
    const q = parseQuietHours('12:00-13:00')
    expect(quietState(at('2026-03-10T11:59:00Z'), q, 'UTC')).toEqual({ quiet: false })
    expect(quietState(at('2026-03-10T12:10:00Z'), q, 'UTC')).toEqual({ quiet: true, endsAt: at('2026-03-10T13:00:00Z') })
    expect(quietState(at('2026-03-10T13:00:00Z'), q, 'UTC')).toEqual({ quiet: false })
  })

  it('uses the current time when asked through Date.now (fake clock)', () => {
    vi.useFakeTimers()
    vi.setSystemTime(new Date('2026-03-10T23:00:00Z'))
    expect(quietState(Date.now(), parseQuietHours('22:00-06:00'), 'UTC')).toMatchObject({ quiet: true })
    vi.setSystemTime(new Date('2026-03-11T07:00:00Z'))
    expect(quietState(Date.now(), parseQuietHours('22:00-06:00'), 'UTC')).toEqual({ quiet: false })
    vi.useRealTimers()
  })
})

describe('opening mails', () => {
  const now = at('2026-03-10T10:00:00Z')

  it('sends the first mail of a watch at once', () => {
    const a = alert()
    expect(planOpenings([a], ctx(now), cfg())).toEqual({ decisions: [{ id: a.id, action: 'send' }], digest: [] })
  })

  it('rate-limits a watch: a second opening within the limit waits until the limit has passed', () => {
    const a = alert({ ruleId: 'rh-band' })
    const last = now - 4 * MIN
    const plan = planOpenings([a], ctx(now, { lastNotified: new Map([[watchKey(1, 'rh-band'), last]]) }), cfg())
    expect(plan.decisions).toEqual([{ id: a.id, action: 'defer', until: last + 10 * MIN, reason: 'rate_limit' }])
    // The same watch of another booth is not limited.
    const b = alert({ ruleId: 'rh-band', boothId: 2 })
    expect(planOpenings([b], ctx(now, { lastNotified: new Map([[watchKey(1, 'rh-band'), last]]) }), cfg()).decisions[0]).toEqual({ id: b.id, action: 'send' })
  })

  it('rate-limits within one round too: two openings of one watch → one mail, one deferred', () => {
    const a = alert({ ruleId: 'x' })
    const b = alert({ ruleId: 'x' })
    const plan = planOpenings([a, b], ctx(now), cfg())
    expect(plan.decisions).toEqual([
      { id: a.id, action: 'send' },
      { id: b.id, action: 'defer', until: now + 10 * MIN, reason: 'rate_limit' },
    ])
  })

  it('sends at most digestAfter single mails per window; the rest wait for one digest at the end of the window', () => {
    const list = [alert(), alert(), alert(), alert(), alert()]
    const plan = planOpenings(list, ctx(now), cfg())
    expect(plan.decisions.map((d) => d.action)).toEqual(['send', 'send', 'send', 'hold', 'hold'])
    expect(plan.decisions.slice(3)).toEqual([
      { id: list[3]!.id, action: 'hold', until: now + MIN },
      { id: list[4]!.id, action: 'hold', until: now + MIN },
    ])
    expect(plan.digest).toEqual([])
    // At the end of the window the held ones come back due, and go out together.
    const later = now + MIN
    const held = list.slice(3).map((a) => ({ ...a, notifyState: 'digest' as const }))
    const round2 = planOpenings(held, ctx(later, { recentSends: [now, now, now] }), cfg())
    expect(round2.digest).toEqual(held.map((a) => a.id))
    expect(round2.decisions).toEqual([])
  })

  it('counts mails of earlier rounds in the window, and joins a digest already being collected', () => {
    const a = alert()
    const b = alert()
    const due = now + 20 * S
    const plan = planOpenings([a, b], ctx(now, { recentSends: [now - 30 * S, now - 20 * S, now - 2 * MIN], digestDueAt: due }), cfg())
    expect(plan.decisions).toEqual([
      { id: a.id, action: 'send' },
      { id: b.id, action: 'hold', until: due },
    ])
  })

  it('defers non-critical mails in quiet hours to their end, but sends critical ones', () => {
    const night = at('2026-03-10T23:00:00Z')
    const warning = alert()
    const critical = alert({ severity: 'critical', ruleId: 'dew' })
    const plan = planOpenings([warning, critical], ctx(night), cfg({ quietHours: parseQuietHours('22:00-06:00') }))
    expect(plan.decisions).toEqual([
      { id: warning.id, action: 'defer', until: at('2026-03-11T06:00:00Z'), reason: 'quiet_hours' },
      { id: critical.id, action: 'send' },
    ])
  })

  it('skips a mail whose alert was acknowledged or resolved meanwhile, but not one held for a digest', () => {
    const acked = alert({ state: 'acknowledged', notifyState: 'deferred' })
    const resolved = alert({ state: 'resolved', notifyState: 'deferred' })
    const held = alert({ state: 'resolved', notifyState: 'digest' })
    const plan = planOpenings([acked, resolved, held], ctx(now), cfg())
    expect(plan.decisions).toEqual([
      { id: acked.id, action: 'skip', reason: 'acknowledged' },
      { id: resolved.id, action: 'skip', reason: 'resolved' },
    ])
    expect(plan.digest).toEqual([held.id])
  })

  it('a flapping watch mails once per rate-limit period (simulated with fake timers)', () => {
    vi.useFakeTimers()
    vi.setSystemTime(now)
    const lastNotified = new Map<string, number>()
    const sent: number[] = []
    let pending: PlanAlert[] = []
    const deferred = new Map<number, { alert: PlanAlert; until: number }>()
    // The watch opens every 2 minutes for 31 minutes; the notifier runs every 5 s.
    const opener = setInterval(() => pending.push(alert({ ruleId: 'flappy' })), 2 * MIN)
    pending.push(alert({ ruleId: 'flappy' }))
    const round = setInterval(() => {
      const t = Date.now()
      const due = [...pending, ...[...deferred.values()].filter((d) => d.until <= t).map((d) => ({ ...d.alert, notifyState: 'deferred' as const }))]
      pending = []
      for (const a of due) deferred.delete(a.id)
      const plan = planOpenings(due, ctx(t, { lastNotified }), cfg({ digestAfter: 100 }))
      for (const d of plan.decisions) {
        const a = due.find((x) => x.id === d.id)!
        if (d.action === 'send') {
          sent.push(t)
          lastNotified.set(watchKey(a.boothId, a.ruleId), t)
        } else if (d.action === 'defer') deferred.set(a.id, { alert: a, until: d.until })
      }
    }, 5 * S)
    vi.advanceTimersByTime(31 * MIN)
    clearInterval(opener)
    clearInterval(round)
    vi.useRealTimers()
    const minutes = sent.map((t) => Math.round((t - now) / MIN))
    expect(minutes).toEqual([0, 10, 20, 30])
  })
})

describe('escalation', () => {
  const now = at('2026-03-10T10:00:00Z')
  const base = { severity: 'warning' as const, state: 'open' as const, escalations: 0, timeZone: 'UTC' }

  it('is due escalateAfter after the first mail, and off when escalateMax is 0', () => {
    expect(firstEscalationAt(now, cfg())).toBe(now + 15 * MIN)
    expect(firstEscalationAt(now, cfg({ escalateMax: 0 }))).toBeNull()
  })

  it('reminds while the alert stays unacknowledged, up to escalateMax times', () => {
    const c = cfg({ escalateMax: 2 })
    expect(planEscalation(base, now, c)).toEqual({ action: 'escalate', next: now + 15 * MIN })
    expect(planEscalation({ ...base, escalations: 1 }, now, c)).toEqual({ action: 'escalate', next: null })
    expect(planEscalation({ ...base, escalations: 2 }, now, c)).toEqual({ action: 'stop' })
  })

  it('stops once the alert is acknowledged or resolved', () => {
    expect(planEscalation({ ...base, state: 'acknowledged' }, now, cfg())).toEqual({ action: 'stop' })
    expect(planEscalation({ ...base, state: 'resolved' }, now, cfg())).toEqual({ action: 'stop' })
  })

  it('waits for the end of quiet hours unless critical', () => {
    const night = at('2026-03-10T02:00:00Z')
    const c = cfg({ quietHours: parseQuietHours('22:00-06:00') })
    expect(planEscalation(base, night, c)).toEqual({ action: 'wait', until: at('2026-03-10T06:00:00Z') })
    expect(planEscalation({ ...base, severity: 'critical' }, night, c)).toEqual({ action: 'escalate', next: night + 15 * MIN })
  })
})

describe('outbox retry delay', () => {
  it('doubles from the base up to the cap', () => {
    expect([1, 2, 3, 4, 5, 6, 10].map((n) => retryDelayMs(n, 5 * S, 60 * S, 0.5))).toEqual([5, 10, 20, 40, 60, 60, 60].map((s) => s * S))
  })

  it('stays within ±20 % of the nominal delay and never above the cap', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 60 }), fc.integer({ min: 1, max: 60_000 }), fc.integer({ min: 1, max: 3_600_000 }), fc.double({ min: 0, max: 1, maxExcluded: true, noNaN: true }), (n, base, max, rand) => {
        const d = retryDelayMs(n, base, max, rand)
        const nominal = Math.min(max, base * 2 ** (n - 1))
        return d <= max && d >= Math.floor(nominal * 0.8) && d <= Math.ceil(nominal * 1.2)
      }),
    )
  })
})

describe('recipients', () => {
  it('lower-cases, trims and keeps each address once', () => {
    expect(uniqueRecipients(['Manager@Larkspur.example', 'admin@larkspur.example'], [' manager@larkspur.example', 'qa@elsewhere.example', ''])).toEqual([
      'manager@larkspur.example',
      'admin@larkspur.example',
      'qa@elsewhere.example',
    ])
  })
})

afterEach(() => {
  vi.useRealTimers()
})
