import { describe, expect, it } from 'vitest'
import { calibrationReminder, DEFAULT_RULES, effectiveRule, upkeepReminder, type UpkeepRule } from '#shared/bake/reminders'
import { daysToLimit, linearTrend } from '#shared/bake/trend'

const NOW = Date.UTC(2026, 10, 30, 12, 0, 0)
const DAY = 86_400_000
const H = 3_600_000

const rule = (o: Partial<UpkeepRule>): UpkeepRule => ({
  task: 'exhaust_filter',
  intervalDays: null,
  intervalBoothHours: null,
  intervalBakeCycles: null,
  dpLimitPa: null,
  trendHorizonDays: null,
  ...o,
})
const usage = (o: Partial<Parameters<typeof upkeepReminder>[1]> = {}) => ({ lastDoneAtMs: null, boothHoursSince: null, bakeCyclesSince: null, ...o })

describe('reminders by date', () => {
  const r = rule({ task: 'inspection', intervalDays: 30 })
  it('due once the interval has passed, soon within 7 days of it, ok before', () => {
    expect(upkeepReminder(r, usage({ lastDoneAtMs: NOW - 31 * DAY }), NOW).status).toBe('due')
    expect(upkeepReminder(r, usage({ lastDoneAtMs: NOW - 30 * DAY }), NOW).status).toBe('due')
    expect(upkeepReminder(r, usage({ lastDoneAtMs: NOW - 24 * DAY }), NOW).status).toBe('soon')
    expect(upkeepReminder(r, usage({ lastDoneAtMs: NOW - 22 * DAY }), NOW).status).toBe('ok')
    const due = upkeepReminder(r, usage({ lastDoneAtMs: NOW - 31 * DAY }), NOW)
    expect(due.reasons[0]).toMatchObject({ by: 'date', dueAtMs: NOW - DAY })
    expect(due.reasons[0]!.message).toBe('Due since 2026-11-29 (every 30 days)')
  })
  it('never done: due, "No record yet"', () => {
    const x = upkeepReminder(r, usage(), NOW)
    expect(x.status).toBe('due')
    expect(x.reasons[0]).toMatchObject({ by: 'never', message: 'No record yet' })
  })
})

describe('reminders by booth hours and bake cycles', () => {
  it('hours: due at the interval, soon from 90 %', () => {
    const r = rule({ intervalBoothHours: 200 })
    expect(upkeepReminder(r, usage({ boothHoursSince: 200 }), NOW).status).toBe('due')
    expect(upkeepReminder(r, usage({ boothHoursSince: 180 }), NOW).status).toBe('soon')
    expect(upkeepReminder(r, usage({ boothHoursSince: 179.9 }), NOW).status).toBe('ok')
    expect(upkeepReminder(r, usage({ boothHoursSince: 123.44 }), NOW).reasons[0]!.message).toBe('123.4 of 200 booth hours used')
  })
  it('bake cycles: the heater service after 500 bakes', () => {
    const r = effectiveRule('heater_service')
    expect(r.intervalBakeCycles).toBe(500)
    const x = upkeepReminder(r, usage({ lastDoneAtMs: NOW - 10 * DAY, bakeCyclesSince: 512 }), NOW)
    expect(x.status).toBe('due')
    expect(x.reasons[0]).toMatchObject({ by: 'cycles', message: '512 of 500 bake cycles' })
  })
  it('the worst check wins and comes first', () => {
    const r = rule({ intervalDays: 60, intervalBoothHours: 200 })
    const x = upkeepReminder(r, usage({ lastDoneAtMs: NOW - 5 * DAY, boothHoursSince: 250 }), NOW)
    expect(x.status).toBe('due')
    expect(x.reasons.map((y) => [y.by, y.status])).toEqual([
      ['hours', 'due'],
      ['date', 'ok'],
    ])
  })
})

describe('filter pressure-drop limit and trend', () => {
  const r = rule({ dpLimitPa: 250, trendHorizonDays: 3 })
  // Hourly points over the last 7 days on the exact line value = start + slope·d (d = days since the first
  // point), so "now" sits at start + 7·slope.
  const points = (slopePerDay: number, start: number, days = 7) =>
    Array.from({ length: days * 24 + 1 }, (_, i) => ({ t: NOW - days * DAY + i * H, value: start + slopePerDay * (i / 24) }))

  it('least squares recovers an exact line; daysToLimit = (limit − now) / slope', () => {
    const tr = linearTrend(points(10, 180))
    expect(tr.slopePerDay).toBeCloseTo(10, 9)
    expect(tr.valueAt(NOW)).toBeCloseTo(250, 9)
    // 180 + 10·7 = 250 now: at the limit already.
    expect(daysToLimit(tr, NOW, 250)).toBe(0)
    // Limit 280: (280 − 250) / 10 = 3 days.
    expect(daysToLimit(tr, NOW, 280)).toBeCloseTo(3, 9)
    expect(daysToLimit(linearTrend(points(-2, 200)), NOW, 250)).toBeNull()
  })

  it('due when the trend reaches the limit within the horizon: 10 Pa/day from 200 → 250 Pa in 2 days', () => {
    // 160 + 10·7 = 230 Pa now; (250 − 230) / 10 = 2 days ≤ the 3-day horizon.
    const x = upkeepReminder(r, usage({ lastDoneAtMs: NOW - 20 * DAY, dpPoints: points(10, 160), latestDpPa: 230 }), NOW)
    expect(x.trend!.daysToLimit).toBeCloseTo(2, 6)
    expect(x.status).toBe('due')
    const trend = x.reasons.find((y) => y.by === 'trend')!
    expect(trend.status).toBe('due')
    expect(trend.message).toBe('At the recent rate (+10 Pa a day) it reaches 250 Pa in about 2 days')
    // The limit check itself is fine: 230 < 250.
    expect(x.reasons.find((y) => y.by === 'limit')!.status).toBe('ok')
  })

  it('soon within twice the horizon, ok beyond, and a flat line is not a reminder', () => {
    // 2 Pa/day from 200 → 214 Pa now → (250 − 214) / 2 = 18 days > 2 × 3: ok.
    expect(upkeepReminder(r, usage({ dpPoints: points(2, 200), latestDpPa: 214, lastDoneAtMs: NOW - DAY }), NOW).status).toBe('ok')
    // 10 Pa/day from 135 → 205 Pa now → (250 − 205) / 10 = 4.5 days, between 3 and 6: soon.
    expect(upkeepReminder(r, usage({ dpPoints: points(10, 135), latestDpPa: 205, lastDoneAtMs: NOW - DAY }), NOW).status).toBe('soon')
    const flat = upkeepReminder(r, usage({ dpPoints: points(0, 150), latestDpPa: 150, lastDoneAtMs: NOW - DAY }), NOW)
    expect(flat.status).toBe('ok')
    expect(flat.reasons.find((y) => y.by === 'trend')!.message).toBe('Pressure drop is not rising')
  })

  it('over the limit now: due, whatever the trend', () => {
    const x = upkeepReminder(r, usage({ dpPoints: [], latestDpPa: 262, lastDoneAtMs: NOW - DAY }), NOW)
    expect(x.status).toBe('due')
    expect(x.reasons[0]).toMatchObject({ by: 'limit', message: 'Pressure drop 262 Pa (limit 250 Pa)' })
  })

  it('too few points (or less than a day of them) give no trend', () => {
    const few = points(50, 100).slice(-5)
    const x = upkeepReminder(r, usage({ dpPoints: few, latestDpPa: 240, lastDoneAtMs: NOW - DAY }), NOW)
    expect(x.trend).toBeNull()
    expect(x.reasons.some((y) => y.by === 'trend')).toBe(false)
  })
})

describe('calibration due dates and rules', () => {
  it('due from the next-due date set at the last calibration', () => {
    expect(calibrationReminder('Panel temperature', NOW - 200 * DAY, NOW - DAY, NOW).status).toBe('due')
    expect(calibrationReminder('Panel temperature', NOW - 170 * DAY, NOW + 3 * DAY, NOW).status).toBe('soon')
    expect(calibrationReminder('Panel temperature', NOW - 10 * DAY, NOW + 170 * DAY, NOW).status).toBe('ok')
  })
  it('overrides replace the defaults field by field; null switches a check off', () => {
    const r = effectiveRule('exhaust_filter', { intervalBoothHours: null, dpLimitPa: 300 })
    expect(r).toMatchObject({ intervalDays: DEFAULT_RULES.exhaust_filter.intervalDays, intervalBoothHours: null, dpLimitPa: 300 })
  })
})
