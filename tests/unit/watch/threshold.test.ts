import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  createThresholdState,
  forceClearThreshold,
  resetPending,
  stepThreshold,
  type ThresholdRule,
} from '#shared/watch'
import { MIN, recorded, runThreshold, S, T0 } from './helpers'

const rhRule: ThresholdRule = { low: 40, high: 70, openAfterMs: 2 * MIN, clearAfterMs: MIN, hysteresis: 2 }

// A humid afternoon at 1 Hz (invented, shaped like a logged one): a short excursion broken by one in-band reading,
// a long one with a peak, a spell just inside the limit (not far enough to clear), a broken recovery, a real one.
const humidAfternoon = recorded(
  [
    [0, 64],
    [60, 71], // excursion from 60 s …
    [120, 69], // … broken by one reading inside the band
    [121, 72.5], // new excursion from 121 s: opens at 241 s
    [300, 74],
    [330, 76.3], // peak
    [331, 74],
    [420, 69], // inside the band but within the 2 %RH hysteresis: stays open
    [600, 67.5], // recovery from 600 s …
    [630, 68.5], // … broken (above 70 − 2)
    [631, 66], // recovery from 631 s: clears at 691 s
  ],
  800,
)

describe('threshold watch on a recorded humidity sequence', () => {
  it('opens once after 2 min continuously out, clears only 1 min after being 2 %RH back inside', () => {
    const { events } = runThreshold(rhRule, humidAfternoon)
    expect(events.map((e) => [e.type, e.sec, e.value, e.limit, e.peak, e.side, (e.since - T0) / S])).toEqual([
      ['open', 241, 72.5, 70, 72.5, 'high', 121],
      ['clear', 691, 66, 70, 76.3, 'high', 241],
    ])
  })

  it('does not open one reading before the duration', () => {
    const { events, state } = runThreshold(rhRule, humidAfternoon.filter((r) => r.t < T0 + 241 * S))
    expect(events).toEqual([])
    expect(state.pendingSince).toBe(T0 + 121 * S)
  })

  it('does not clear one reading before the clear duration', () => {
    const { events, state } = runThreshold(rhRule, humidAfternoon.filter((r) => r.t < T0 + 691 * S))
    expect(events.map((e) => e.type)).toEqual(['open'])
    expect(state.openedAt).toBe(T0 + 241 * S)
    expect(state.peak).toBe(76.3)
  })

  it('a value on the limit is inside the band', () => {
    const { events } = runThreshold(rhRule, recorded([[0, 70], [300, 40]], 600))
    expect(events).toEqual([])
  })

  it('openAfterMs 0 opens on the first reading out; clearAfterMs 0 clears on the first reading back', () => {
    const rule = { ...rhRule, openAfterMs: 0, clearAfterMs: 0 }
    const { events } = runThreshold(rule, recorded([[0, 60], [5, 70.1], [8, 68.5], [9, 67.9]], 12))
    expect(events.map((e) => [e.type, e.sec])).toEqual([
      ['open', 5],
      ['clear', 9],
    ])
  })
})

describe('low side and one-sided rules', () => {
  it('dew-point margin (min 3 °C, no high): tracks the lowest value as peak', () => {
    const rule: ThresholdRule = { low: 3, openAfterMs: MIN, clearAfterMs: MIN, hysteresis: 0.5 }
    const seq = recorded([[0, 6], [30, 2.8], [60, 1.9], [70, 2.5], [120, 3.3], [200, 3.6]], 300)
    const { events } = runThreshold(rule, seq)
    expect(events.map((e) => [e.type, e.sec, e.value, e.peak, e.side])).toEqual([
      ['open', 90, 2.5, 1.9, 'low'],
      // 3.3 is back above 3 but not above 3.5: the recovery only starts at 200 s
      ['clear', 260, 3.6, 1.9, 'low'],
    ])
  })

  it('filter maximum (no low): any low value is fine', () => {
    const rule: ThresholdRule = { high: 250, openAfterMs: 5 * MIN, clearAfterMs: MIN, hysteresis: 10 }
    expect(runThreshold(rule, recorded([[0, -50], [100, 0], [200, 249.9]], 900)).events).toEqual([])
  })

  it('switching from one side to the other starts a new excursion', () => {
    const rule = { ...rhRule, openAfterMs: 10 * S }
    const { events } = runThreshold(rule, recorded([[0, 75], [6, 35]], 30))
    expect(events.map((e) => [e.type, e.sec, e.side])).toEqual([['open', 16, 'low']])
  })

  it('an alert opened high does not clear by falling below the low limit', () => {
    const rule = { ...rhRule, openAfterMs: 0, clearAfterMs: 0 }
    const { events } = runThreshold(rule, recorded([[0, 75], [5, 30], [10, 50]], 12))
    expect(events.map((e) => [e.type, e.sec, e.peak])).toEqual([
      ['open', 0, 75],
      ['clear', 10, 75],
    ])
  })
})

describe('no data and misuse', () => {
  it('null, undefined, NaN and ±Infinity values change nothing (same state object)', () => {
    const open = runThreshold({ ...rhRule, openAfterMs: 0 }, [{ t: T0, value: 80 }]).state
    for (const state of [createThresholdState(), open]) {
      for (const value of [null, undefined, Number.NaN, Infinity, -Infinity]) {
        const step = stepThreshold(rhRule, state, { t: T0 + 10 * MIN, value })
        expect(step.state).toBe(state)
        expect(step.event).toBeUndefined()
      }
    }
  })

  it('gaps of no data inside a sequence give the same events as the sequence without them', () => {
    const withGaps = humidAfternoon.flatMap((r, i) => (i % 7 === 3 ? [r, { t: r.t + 1, value: null }] : [r]))
    expect(runThreshold(rhRule, withGaps).events).toEqual(runThreshold(rhRule, humidAfternoon).events)
  })

  it('a non-finite time changes nothing', () => {
    const state = createThresholdState()
    expect(stepThreshold(rhRule, state, { t: Number.NaN, value: 99 }).state).toBe(state)
  })

  it('hysteresis larger than half the band is capped, so the alert can still clear', () => {
    const rule: ThresholdRule = { low: 40, high: 50, openAfterMs: 0, clearAfterMs: 0, hysteresis: 20 }
    const { events } = runThreshold(rule, recorded([[0, 55], [5, 46], [6, 45]], 8))
    expect(events.map((e) => [e.type, e.sec])).toEqual([
      ['open', 0],
      ['clear', 6],
    ])
  })
})

describe('resetPending and forceClearThreshold', () => {
  it('resetPending drops a pending excursion: the full duration is needed again', () => {
    const rule = { ...rhRule, openAfterMs: 10 * S }
    let { state } = runThreshold(rule, recorded([[0, 75]], 8))
    expect(state.pendingSince).toBe(T0)
    state = resetPending(state)
    expect(state).toEqual(createThresholdState())
    const seq = recorded([[8, 75]], 30)
    let opened = -1
    for (const r of seq) {
      const step = stepThreshold(rule, state, r)
      state = step.state
      if (step.event && opened < 0) opened = (step.event.at - T0) / S
    }
    expect(opened).toBe(18)
  })

  it('resetPending keeps an open alert open but restarts its recovery', () => {
    const rule = { ...rhRule, openAfterMs: 0, clearAfterMs: 10 * S }
    const { state } = runThreshold(rule, recorded([[0, 75], [2, 60]], 5))
    expect(state.pendingSince).toBe(T0 + 2 * S)
    const reset = resetPending(state)
    expect(reset.openedAt).toBe(T0)
    expect(reset.pendingSince).toBeNull()
  })

  it('forceClearThreshold ends an open alert without a value, and is a no-op when closed', () => {
    const { state } = runThreshold({ ...rhRule, openAfterMs: 0 }, recorded([[0, 75], [1, 78]], 3))
    const step = forceClearThreshold(rhRule, state, T0 + MIN)
    expect(step.event).toEqual({ type: 'clear', at: T0 + MIN, value: null, limit: 70, peak: 78, side: 'high', since: T0 })
    expect(step.state).toEqual(createThresholdState())
    expect(forceClearThreshold(rhRule, createThresholdState(), T0).event).toBeUndefined()
  })
})

describe('properties', () => {
  const band = fc
    .tuple(fc.double({ min: -100, max: 100, noNaN: true }), fc.double({ min: 0.1, max: 100, noNaN: true }))
    .map(([low, width]) => ({ low, high: low + width }))
  const timing = fc.record({
    openAfterMs: fc.integer({ min: 0, max: 5 * MIN }),
    clearAfterMs: fc.integer({ min: 0, max: 5 * MIN }),
    hysteresis: fc.double({ min: 0, max: 10, noNaN: true }),
  })
  const steps = fc.array(fc.integer({ min: 0, max: 30_000 }), { minLength: 1, maxLength: 200 })

  it('a series always inside the band never opens', () => {
    fc.assert(
      fc.property(band, timing, steps, fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 200, maxLength: 200 }), (b, tm, dts, fr) => {
        let t = T0
        const inside = (f: number) => Math.min(b.high, Math.max(b.low, b.low + f * (b.high - b.low)))
        const readings = dts.map((dt, i) => ({ t: (t += dt), value: inside(fr[i]!) }))
        const { events, state } = runThreshold({ ...b, ...tm }, readings)
        expect(events).toEqual([])
        expect(state.openedAt).toBeNull()
      }),
    )
  })

  it('events alternate open, clear, open … whatever the series (no duplicate opens or clears)', () => {
    const value = fc.oneof(fc.double({ min: -200, max: 200, noNaN: true }), fc.constant(null), fc.constant(Number.NaN))
    fc.assert(
      fc.property(band, timing, fc.array(fc.tuple(fc.integer({ min: 0, max: 60_000 }), value), { maxLength: 300 }), (b, tm, rows) => {
        let t = T0
        const { events, state } = runThreshold({ ...b, ...tm }, rows.map(([dt, v]) => ({ t: (t += dt), value: v })))
        events.forEach((e, i) => expect(e.type).toBe(i % 2 === 0 ? 'open' : 'clear'))
        expect(state.openedAt !== null).toBe(events.length % 2 === 1)
      }),
    )
  })
})
