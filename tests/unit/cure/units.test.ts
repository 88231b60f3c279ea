import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  cToF,
  deltaCToF,
  deltaFToC,
  fpmToMps,
  fToC,
  inH2OToPa,
  kPaToPsi,
  mpsToFpm,
  paToInH2O,
  PA_PER_INH2O,
  PA_PER_PSI,
  psiToKPa,
} from '#shared/cure'

// Source for every check: NIST SP 811 (2008 ed.), Appendix B, and the exact base definitions it rests on
// (1 ft = 0.3048 m, 1 in = 0.0254 m, 1 lb = 0.45359237 kg, g_n = 9.80665 m/s², t/°F = 1.8·t/°C + 32).
describe('temperature', () => {
  it('fixed points: 0 °C = 32 °F, 100 °C = 212 °F, −40 °C = −40 °F, −273.15 °C = −459.67 °F', () => {
    expect(cToF(0)).toBe(32)
    expect(cToF(100)).toBe(212)
    expect(cToF(-40)).toBe(-40)
    expect(cToF(-273.15)).toBeCloseTo(-459.67, 10)
    expect(fToC(212)).toBe(100)
    expect(fToC(-40)).toBe(-40)
  })

  it('a difference of 1 °C is 1.8 °F with no offset (3 °C margin ≈ 5.4 °F)', () => {
    expect(deltaCToF(1)).toBe(1.8)
    expect(deltaCToF(3)).toBeCloseTo(5.4, 12)
    expect(deltaFToC(9)).toBe(5)
    expect(deltaCToF(-10)).toBe(-18)
  })

  it('below absolute zero is NaN', () => {
    expect(cToF(-273.16)).toBeNaN()
    expect(fToC(-460)).toBeNaN()
  })

  it('round-trips (fast-check)', () => {
    fc.assert(
      fc.property(fc.double({ min: -273.15, max: 1e6, noNaN: true }), (c) => {
        expect(fToC(cToF(c))).toBeCloseTo(c, 6)
        expect(deltaFToC(deltaCToF(c))).toBeCloseTo(c, 6)
      }),
    )
  })
})

describe('air velocity', () => {
  it('1 ft/min = 0.00508 m/s exactly; 1 m/s = 196.850 393 7 ft/min', () => {
    expect(fpmToMps(1)).toBe(0.00508)
    expect(fpmToMps(100)).toBeCloseTo(0.508, 12)
    expect(mpsToFpm(1)).toBeCloseTo(196.8503937, 6)
    expect(mpsToFpm(0.3048 / 60)).toBeCloseTo(1, 12)
  })
})

describe('pressure', () => {
  it('conventional inch of water = 249.08891 Pa = 1000 kg/m³ · g_n · 0.0254 m', () => {
    expect(PA_PER_INH2O).toBe(249.08891)
    expect(PA_PER_INH2O).toBeCloseTo(1000 * 9.80665 * 0.0254, 9)
    expect(inH2OToPa(1)).toBe(249.08891)
    expect(paToInH2O(249.08891)).toBe(1)
    expect(paToInH2O(1)).toBeCloseTo(4.01463e-3, 8)
  })

  it('1 psi = 6.894757 kPa (SP 811 table, 7 digits); 1 atm = 101.325 kPa = 14.695 95 psi', () => {
    expect(psiToKPa(1)).toBeCloseTo(6.894757, 6)
    expect(PA_PER_PSI).toBeCloseTo(6894.757293168, 6)
    expect(kPaToPsi(101.325)).toBeCloseTo(14.69595, 5)
  })

  it('round-trips and rejects non-numbers', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), (x) => {
        expect(paToInH2O(inH2OToPa(x))).toBeCloseTo(x, 6)
        expect(kPaToPsi(psiToKPa(x))).toBeCloseTo(x, 6)
        expect(fpmToMps(mpsToFpm(x))).toBeCloseTo(x, 6)
      }),
    )
    for (const f of [cToF, fToC, deltaCToF, deltaFToC, mpsToFpm, fpmToMps, paToInH2O, inH2OToPa, kPaToPsi, psiToKPa]) {
      expect(f(Number.NaN)).toBeNaN()
      expect(f(Number.POSITIVE_INFINITY)).toBeNaN()
    }
  })
})
