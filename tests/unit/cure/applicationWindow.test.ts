import { describe, expect, it } from 'vitest'
import { applicationWindowCheck, condensationGuard } from '#shared/cure'

// Invented TDS application limits: 10…35 °C, 20…80 % RH (bounds inclusive, our rule).
const limits = { minTempC: 10, maxTempC: 35, minRhPct: 20, maxRhPct: 80 }

describe('application window', () => {
  it('passes inside and on the bounds', () => {
    expect(applicationWindowCheck(limits, { airTempC: 20, rhPct: 50 })).toEqual({ ok: true, limitsValid: true, problems: [] })
    expect(applicationWindowCheck(limits, { airTempC: 35, rhPct: 20 }).ok).toBe(true)
  })

  it('lists each problem with channel, value, limit and kind', () => {
    const r = applicationWindowCheck(limits, { airTempC: 8, panelTempC: 36, rhPct: 85 })
    expect(r.ok).toBe(false)
    expect(r.problems).toEqual([
      { channel: 'airTempC', value: 8, limit: 10, kind: 'below' },
      { channel: 'panelTempC', value: 36, limit: 35, kind: 'above' },
      { channel: 'rhPct', value: 85, limit: 80, kind: 'above' },
    ])
  })

  it('flags a missing reading for a limited channel, and malformed limits', () => {
    expect(applicationWindowCheck(limits, { airTempC: 20 }).problems).toEqual([{ channel: 'rhPct', value: null, limit: 20, kind: 'missing' }])
    expect(applicationWindowCheck({ minTempC: 10 }, { airTempC: 20 }).ok).toBe(true)
    expect(applicationWindowCheck({ minTempC: 30, maxTempC: 10 }, { airTempC: 20 })).toEqual({ ok: false, limitsValid: false, problems: [] })
    expect(applicationWindowCheck({ minTempC: Number.NaN }, { airTempC: 20 }).limitsValid).toBe(false)
  })
})

describe('condensation guard (surface ≥ dew point + 3 °C, common coatings practice)', () => {
  // Dew point of 20 °C / 50 % air = 9.26 °C (Magnus, Alduchov & Eskridge 1996; psychrolib agrees to 0.02 °C).
  it('needs a 3 °C margin by default', () => {
    const near = condensationGuard(12, 20, 50)
    expect(near.dewPointC).toBeCloseTo(9.26, 2)
    expect(near.marginC).toBeCloseTo(2.74, 2)
    expect(near.ok).toBe(false)
    expect(condensationGuard(12.3, 20, 50).ok).toBe(true)
    expect(condensationGuard(12, 20, 50, 2).ok).toBe(true)
  })

  it('fails closed on bad input', () => {
    const r = condensationGuard(12, 20, 0)
    expect(r.ok).toBe(false)
    expect(r.marginC).toBeNaN()
    expect(condensationGuard(12, 20, 50, -1).ok).toBe(false)
  })
})
