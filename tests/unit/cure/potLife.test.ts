import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { PotLifeSpec } from '#shared/cure'
import { potLife } from '#shared/cure'
import { boothTemp, constantSeries, MIN, seriesArb, T0 } from './helpers'

// Source: Q10 rule (DESIGN §6: same temperature scaling as flash), Q10 = 2 common practice; pot life at 20 °C
// from the TDS (invented: 60 min).
const spec: PotLifeSpec = { potLifeMinutes: 60 }

describe('pot life', () => {
  it('at 30 °C a 60 min pot life lasts 30 min (2^((30 − 20)/10) = 2)', () => {
    const rows = constantSeries(T0, MIN, 40, { airTempC: 30 })
    const r = potLife(spec, rows, T0, T0 + 10 * MIN)
    expect(r.usedFraction).toBeCloseTo(1 / 3, 12)
    expect(r.expired).toBe(false)
    expect(r.expiresAtMs).toBeCloseTo(T0 + 30 * MIN, 3)
    const late = potLife(spec, rows, T0, T0 + 35 * MIN)
    expect(late.expired).toBe(true)
    expect(late.expiresAtMs).toBeCloseTo(T0 + 30 * MIN, 3)
  })

  it('at 10 °C with Q10 3 it lasts three times as long', () => {
    const r = potLife({ potLifeMinutes: 60, q10: 3 }, constantSeries(T0, MIN, 30, { airTempC: 10 }), T0, T0 + 30 * MIN)
    expect(r.usedFraction).toBeCloseTo(30 / 3 / 60, 12)
  })

  // A mix must never look fresher because a sensor went quiet: by default gaps count at max(1, last rate).
  it('counts a gap conservatively by default, or not at all when asked', () => {
    const rows = [{ t: T0, airTempC: 30 }]
    const r = potLife(spec, rows, T0, T0 + 20 * MIN)
    expect(r.usedFraction).toBeCloseTo((20 * 2) / 60, 12) // 2 min held + 18 min gap, all at r = 2
    expect(r.uncertain).toBe(true)
    expect(r.reasons).toContain('gap-counted-conservatively')
    expect(r.expiresAtMs).toBeCloseTo(T0 + 30 * MIN, 3) // projected at the conservative rate
    const cold = potLife(spec, [{ t: T0, airTempC: 0 }], T0, T0 + 20 * MIN)
    expect(cold.usedFraction).toBeCloseTo((2 * 0.25 + 18 * 1) / 60, 12) // the gap counts at least at r = 1
    const ignore = potLife(spec, rows, T0, T0 + 20 * MIN, { gapPolicy: 'ignore' })
    expect(ignore.usedFraction).toBeCloseTo((2 * 2) / 60, 12)
    expect(ignore.expiresAtMs).toBeNull()
  })

  it('never counts less than with readings, and its estimate is never in the past (fast-check)', () => {
    fc.assert(
      fc.property(seriesArb({ airTempC: fc.oneof(boothTemp, fc.constant(Number.NaN)) }), fc.integer({ min: 0, max: 60 * MIN }), fc.integer({ min: 0, max: 60 * MIN }), (rows, x, y) => {
        const [n1, n2] = x <= y ? [x, y] : [y, x]
        const a = potLife(spec, rows, T0, T0 + n1)
        const b = potLife(spec, rows, T0, T0 + n2)
        expect(b.usedFraction).toBeGreaterThanOrEqual(a.usedFraction)
        expect(b.expiresAtMs).not.toBeNull()
        if (!b.expired) expect(b.expiresAtMs).toBeGreaterThanOrEqual(T0 + n2)
        else expect(b.expiresAtMs).toBeLessThanOrEqual(T0 + n2)
      }),
    )
  })

  it('rejects a non-positive pot life or a Q10 below 1', () => {
    expect(potLife({ potLifeMinutes: 0 }, [], T0, T0).usedFraction).toBeNaN()
    expect(potLife({ potLifeMinutes: 60, q10: 0.5 }, [], T0, T0).reasons).toEqual(['invalid-input'])
    expect(potLife(spec, [], T0, T0, { gapPolicy: 'sometimes' as never }).usedFraction).toBeNaN()
  })
})
