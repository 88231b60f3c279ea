import psychrolib from 'psychrolib'
import { describe, expect, it } from 'vitest'
import {
  dewPointC,
  dewPointMarginC,
  saturationVapourPressurePa,
  vapourPressureDeficitPa,
} from '#shared/cure'

psychrolib.SetUnitSystem(psychrolib.SI)

const relErr = (a: number, b: number) => Math.abs(a / b - 1)

describe('saturation vapour pressure', () => {
  // Source: ASHRAE Handbook—Fundamentals (2017), ch. 1, table of thermodynamic properties of water at saturation
  // (values quoted from memory; they agree with IAPWS steam tables to 4 digits): 0.01 °C 611.7 Pa, 10 °C 1228 Pa,
  // 20 °C 2339 Pa, 30 °C 4247 Pa, 40 °C 7384 Pa, 50 °C 12 352 Pa. Magnus / Alduchov–Eskridge is a fit: allow 0.4 %.
  it.each([
    [0.01, 611.7],
    [10, 1228.2],
    [20, 2339.2],
    [30, 4246.7],
    [40, 7384.4],
    [50, 12352],
  ])('%s °C ≈ %s Pa (ASHRAE table, from memory)', (t, pa) => {
    expect(relErr(saturationVapourPressurePa(t), pa)).toBeLessThan(0.004)
  })

  // Source: psychrolib GetSatVapPres (ASHRAE Handbook—Fundamentals 2017 ch. 1 eqn 6, Hyland–Wexler, over water
  // above the triple point). Tolerance 0.4 % over 0.01…60 °C.
  it('agrees with psychrolib GetSatVapPres within 0.4 % over 0.01…60 °C', () => {
    for (let t = 0.01; t <= 60; t += 0.5) {
      expect(relErr(saturationVapourPressurePa(t), psychrolib.GetSatVapPres(t))).toBeLessThan(0.004)
    }
  })

  // Source: Alduchov & Eskridge (1996), eq. 21 written as in the paper, in hPa: e_s = 6.1094 exp(17.625 T/(T + 243.04)).
  it('matches the paper form in hPa exactly', () => {
    for (const t of [-40, -10, 0, 15, 25, 37.5, 60]) {
      const hPa = 6.1094 * Math.exp((17.625 * t) / (t + 243.04))
      expect(saturationVapourPressurePa(t)).toBeCloseTo(hPa * 100, 6)
    }
  })

  it('is NaN outside −40…60 °C and for non-numbers', () => {
    for (const t of [-40.01, 60.01, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(saturationVapourPressurePa(t)).toBeNaN()
    }
  })
})

describe('dew point', () => {
  // Source: psychrolib GetTDewPointFromRelHum (ASHRAE 2017 ch. 1), grid 0…50 °C × 10…95 % RH.
  // Where psychrolib's dew point is ≥ 0.01 °C both are over water: tolerance 0.1 °C (observed max ≈ 0.055 °C).
  // Below that psychrolib returns the frost point (over ice), which lies above the dew point over water:
  // we check that ordering and a gap under 3 °C, and check our dew point against psychrolib's vapour pressure.
  it('agrees with psychrolib over 0…50 °C × 10…95 % RH', () => {
    let overWater = 0
    let frost = 0
    for (let t = 0; t <= 50; t += 2.5) {
      for (let rh = 10; rh <= 95; rh += 5) {
        const ours = dewPointC(t, rh)
        const ref = psychrolib.GetTDewPointFromRelHum(t, rh / 100)
        if (ref >= 0.01) {
          overWater++
          expect(Math.abs(ours - ref)).toBeLessThan(0.1)
        } else {
          frost++
          expect(ours).toBeLessThan(ref)
          expect(ref - ours).toBeLessThan(3)
        }
        // Our dew point maps back (Magnus) to the vapour pressure psychrolib gives for this air, within 0.4 %.
        const e = psychrolib.GetVapPresFromRelHum(t, rh / 100)
        expect(relErr(saturationVapourPressurePa(ours), e)).toBeLessThan(0.004)
      }
    }
    expect(overWater).toBeGreaterThan(200)
    expect(frost).toBeGreaterThan(20)
  })

  // Source: Alduchov & Eskridge (1996) Magnus form, inverted independently here by bisection on
  // e_s(Td) = rh · e_s(T) rather than by the closed form the module uses.
  it('matches an independent bisection of the Magnus form', () => {
    const es = (t: number) => 6.1094 * Math.exp((17.625 * t) / (t + 243.04))
    for (const [t, rh] of [[20, 50], [25, 80], [5, 30], [35, 15], [-10, 70], [60, 100]] as const) {
      let lo = -90
      let hi = 70
      for (let i = 0; i < 200; i++) {
        const mid = (lo + hi) / 2
        if (es(mid) < (rh / 100) * es(t)) lo = mid
        else hi = mid
      }
      expect(dewPointC(t, rh)).toBeCloseTo(lo, 8)
    }
  })

  // Source: common published dew-point tables (from memory): 20 °C / 50 % RH → 9.3 °C; 25 °C / 80 % → 21.3 °C.
  it('reproduces textbook values', () => {
    expect(dewPointC(20, 50)).toBeCloseTo(9.3, 1)
    expect(dewPointC(25, 80)).toBeCloseTo(21.3, 1)
    expect(dewPointC(22, 100)).toBeCloseTo(22, 10) // saturated air: dew point = air temperature (definition)
  })

  it('is NaN for RH outside 0 < rh ≤ 100 or temperature outside −40…60 °C', () => {
    expect(dewPointC(20, 0)).toBeNaN()
    expect(dewPointC(20, -5)).toBeNaN()
    expect(dewPointC(20, 100.1)).toBeNaN()
    expect(dewPointC(61, 50)).toBeNaN()
    expect(dewPointC(Number.NaN, 50)).toBeNaN()
  })
})

describe('vapour-pressure deficit and dew-point margin', () => {
  // Source: VPD = e_s·(1 − RH) with psychrolib's (ASHRAE) e_s as the reference, tolerance 0.4 %.
  it('VPD agrees with psychrolib e_s·(1 − RH)', () => {
    for (const [t, rh] of [[20, 50], [30, 20], [10, 90], [45, 5]] as const) {
      const ref = psychrolib.GetSatVapPres(t) * (1 - rh / 100)
      expect(relErr(vapourPressureDeficitPa(t, rh), ref)).toBeLessThan(0.004)
    }
    expect(vapourPressureDeficitPa(25, 100)).toBe(0)
    expect(vapourPressureDeficitPa(25, 0)).toBeCloseTo(saturationVapourPressurePa(25), 9)
    expect(vapourPressureDeficitPa(25, 101)).toBeNaN()
  })

  it('margin is surface − dew point, NaN on non-numbers', () => {
    expect(dewPointMarginC(15, dewPointC(20, 50))).toBeCloseTo(15 - 9.26, 1)
    expect(dewPointMarginC(80, 10)).toBe(70) // a baking panel is allowed beyond 60 °C
    expect(dewPointMarginC(Number.NaN, 10)).toBeNaN()
  })
})
