import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { CureSpec, Sample } from '#shared/cure'
import {
  activationEnergyFromQ10,
  activationEnergyFromSchedule,
  arrheniusFactor,
  cureCredit,
  GAS_CONSTANT_J_PER_MOL_K,
  laggedPanelTempC,
} from '#shared/cure'
import { bakeTemp, constantSeries, MIN, seriesArb, T0 } from './helpers'

const R = 8.314462618 // CODATA 2018 molar gas constant, J/(mol·K), exact in the 2019 SI
const q5000 = 5000 * R // ASTM C1074 works in Q = E/R, kelvin; Q = 5000 K → E = 41 572.3 J/mol
const astmSpec: CureSpec = { specTempC: 20, requiredMinutes: 10_000, minCureTempC: -40, eaJPerMol: q5000 }

describe('Arrhenius equivalent time vs ASTM C1074 (equivalent age, t_e = Σ exp(−Q(1/T_a − 1/T_s)) Δt)', () => {
  it('uses the CODATA 2018 gas constant', () => {
    expect(GAS_CONSTANT_J_PER_MOL_K).toBe(R)
  })

  // Hand-worked, Q = 5000 K, T_s = 20 °C = 293.15 K:
  //   10 °C: 1/283.15 − 1/293.15 = 0.0035316970 − 0.0034112229 = 1.204741e−4 → exp(−5000 · 1.204741e−4) = exp(−0.602370) = 0.547512
  //   30 °C: 1/303.15 − 1/293.15 = 0.0032986970 − 0.0034112229 = −1.125259e−4 → exp(+0.562630) = 1.755282
  //   2 h at 10 °C + 3 h at 30 °C → t_e = 120 · 0.547512 + 180 · 1.755282 = 65.7015 + 315.9508 = 381.652 min (6.361 h)
  it('reproduces the hand-worked two-step example (381.652 equivalent minutes)', () => {
    expect(arrheniusFactor(10, 20, q5000)).toBeCloseTo(0.547512, 6)
    expect(arrheniusFactor(30, 20, q5000)).toBeCloseTo(1.755282, 6)
    const rows: Sample[] = [
      ...constantSeries(T0, MIN, 119, { panelTempC: 10 }),
      ...constantSeries(T0 + 120 * MIN, MIN, 180, { panelTempC: 30 }),
    ]
    const r = cureCredit(astmSpec, rows, T0, T0 + 300 * MIN)
    expect(r.equivalentMinutes).toBeCloseTo(381.652, 3)
    expect(r.estimated).toBe(false)
    expect(r.uncertain).toBe(false)
  })

  // Single step: 10 h at 30 °C = 10 · 1.755282 = 17.553 h at 20 °C.
  it('10 h at 30 °C is 17.553 h at 20 °C', () => {
    const r = cureCredit(astmSpec, constantSeries(T0, MIN, 600, { panelTempC: 30 }), T0, T0 + 600 * MIN)
    expect(r.equivalentMinutes / 60).toBeCloseTo(17.553, 3)
  })
})

describe('activation energy', () => {
  // Invented schedule: 30 min at 60 °C ≡ 8 h at 20 °C.
  //   Ea = R · ln(480/30) / (1/293.15 − 1/333.15) = 8.314462618 · 2.7725887 / 4.0957202e−4 = 56 284.6 J/mol
  it('from two schedule points (hand-worked)', () => {
    expect(activationEnergyFromSchedule({ tempC: 60, minutes: 30 }, { tempC: 20, minutes: 480 })).toBeCloseTo(56284.57, 1)
    expect(activationEnergyFromSchedule({ tempC: 20, minutes: 480 }, { tempC: 60, minutes: 30 })).toBeCloseTo(56284.57, 1)
  })

  it('is NaN for equal temperatures, non-positive times, or warmer = slower', () => {
    expect(activationEnergyFromSchedule({ tempC: 60, minutes: 30 }, { tempC: 60, minutes: 40 })).toBeNaN()
    expect(activationEnergyFromSchedule({ tempC: 60, minutes: 0 }, { tempC: 20, minutes: 40 })).toBeNaN()
    expect(activationEnergyFromSchedule({ tempC: 60, minutes: 30 }, { tempC: 20, minutes: -4 })).toBeNaN()
    expect(activationEnergyFromSchedule({ tempC: 60, minutes: 60 }, { tempC: 20, minutes: 30 })).toBeNaN()
  })

  it('round-trips: schedule points built from Ea give Ea back (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5_000, max: 150_000, noNaN: true }),
        fc.integer({ min: -20, max: 100 }),
        fc.integer({ min: 1, max: 100 }),
        fc.double({ min: 1, max: 2000, noNaN: true }),
        (ea, ta, dt, minutesA) => {
          const tb = ta + dt
          // Same cure: t_b = t_a · exp(−Ea/R · (1/T_a − 1/T_b))
          const minutesB = minutesA * Math.exp((-ea / R) * (1 / (ta + 273.15) - 1 / (tb + 273.15)))
          const back = activationEnergyFromSchedule({ tempC: ta, minutes: minutesA }, { tempC: tb, minutes: minutesB })
          expect(back / ea).toBeCloseTo(1, 6)
        },
      ),
    )
  })

  // Q10 = 2 is the common-practice default: Ea = R ln 2 / (1/293.15 − 1/303.15) = 5.763132 / 1.125259e−4 = 51 216 J/mol,
  // and by construction that Ea makes 30 °C exactly twice as fast as 20 °C.
  it('from Q10 (default 2 at 20 °C)', () => {
    const ea = activationEnergyFromQ10()
    expect(ea).toBeCloseTo(51216.17, 1)
    expect(arrheniusFactor(30, 20, ea)).toBeCloseTo(2, 12)
    expect(arrheniusFactor(70, 60, activationEnergyFromQ10(3, 60))).toBeCloseTo(3, 12)
    expect(activationEnergyFromQ10(0.5)).toBeNaN()
    expect(activationEnergyFromQ10(1)).toBe(0)
  })
})

describe('cure credit', () => {
  const bake: CureSpec = { specTempC: 60, requiredMinutes: 30, minCureTempC: 40, eaJPerMol: activationEnergyFromQ10(2, 60) }

  it('counts nothing below the minimum cure temperature and cannot project from there', () => {
    const r = cureCredit(bake, constantSeries(T0, MIN, 30, { panelTempC: 39.9 }), T0, T0 + 30 * MIN)
    expect(r.equivalentMinutes).toBe(0)
    expect(r.completeAtMs).toBeNull()
    expect(r.reasons).toContain('below-min-cure-now')
  })

  it('projects completion at the current rate, then reports the exact crossing', () => {
    const rows = constantSeries(T0, MIN, 60, { panelTempC: 60 })
    const mid = cureCredit(bake, rows, T0, T0 + 10 * MIN)
    expect(mid.progress).toBeCloseTo(1 / 3, 12)
    expect(mid.completeAtMs).toBeCloseTo(T0 + 30 * MIN, 3)
    const done = cureCredit(bake, rows, T0, T0 + 45 * MIN)
    expect(done.complete).toBe(true)
    expect(done.completeAtMs).toBeCloseTo(T0 + 30 * MIN, 3)
  })

  // Air-only bake: air 20 °C at the start, 60 °C from 30 s on; no panel sensor. Reference: the closed-form lag
  // Tp(t) = 60 − 40·e^(−(t − 0.5)/6) (t in min, from 0.5 min) integrated here by composite Simpson, 200 000 panels.
  it('estimates the panel through the first-order lag when there is no panel sensor', () => {
    const rows: Sample[] = [{ t: T0, airTempC: 20 }, ...constantSeries(T0 + 30_000, 30_000, 119, { airTempC: 60 })]
    const now = T0 + 60 * MIN
    const r = cureCredit(bake, rows, T0, now)
    const f = (tC: number) => (tC >= 40 ? arrheniusFactor(tC, 60, bake.eaJPerMol) : 0)
    const tp = (m: number) => (m < 0.5 ? 20 : 60 - 40 * Math.exp(-(m - 0.5) / 6))
    const n = 200_000
    const h = 59.5 / n
    let s = f(tp(0.5)) + f(tp(60))
    for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(tp(0.5 + i * h))
    const reference = (s * h) / 3
    expect(r.equivalentMinutes / reference).toBeCloseTo(1, 3)
    expect(r.estimated).toBe(true)
    expect(r.reasons).toContain('panel-estimated')
    expect(r.panelTempNowC).toBeCloseTo(tp(60), 6)
    // With no lag the same series credits more: the estimate must not be the air temperature itself.
    const noLag = cureCredit(bake, rows, T0, now, { heatUpLagMinutes: 0 })
    expect(noLag.equivalentMinutes).toBeGreaterThan(r.equivalentMinutes + 1)
  })

  it('continues the lag from the last panel reading when the panel sensor drops out', () => {
    const rows: Sample[] = [
      ...constantSeries(T0, MIN, 10, { panelTempC: 50, airTempC: 60 }),
      ...constantSeries(T0 + 11 * MIN, MIN, 20, { airTempC: 60 }),
    ]
    const r = cureCredit(bake, rows, T0, T0 + 30 * MIN)
    // Panel held 2 min after its last reading at 10 min, so the lag runs from 12 min: 18 min at τ = 6 min.
    expect(r.panelTempNowC).toBeCloseTo(laggedPanelTempC(50, 60, 18, 6), 9)
    expect(r.estimated).toBe(true)
  })

  it('laggedPanelTempC follows Tp0 + (Ta − Tp0)(1 − e^(−t/τ))', () => {
    expect(laggedPanelTempC(20, 60, 6, 6)).toBeCloseTo(60 - 40 / Math.E, 12)
    expect(laggedPanelTempC(20, 60, 6, 0)).toBe(60)
    expect(laggedPanelTempC(20, 60, -1, 6)).toBeNaN()
  })
})

describe('cure credit properties (fast-check)', () => {
  const spec: CureSpec = { specTempC: 60, requiredMinutes: 20, minCureTempC: 25, eaJPerMol: activationEnergyFromQ10(2, 60) }
  const nowArb = fc.integer({ min: 0, max: 40 * 30_000 })
  const mixed = seriesArb({ panelTempC: fc.oneof(bakeTemp, fc.constant(Number.NaN)), airTempC: bakeTemp })

  it('constant panel temperature gives the closed form t · exp(−Ea/R(1/T − 1/T_spec))', () => {
    fc.assert(
      fc.property(bakeTemp, fc.integer({ min: 0, max: 120 * MIN }), (t, elapsed) => {
        const rows = constantSeries(T0, MIN, Math.ceil(elapsed / MIN) + 1, { panelTempC: t })
        const r = cureCredit(spec, rows, T0, T0 + elapsed)
        const rate = t >= 25 ? Math.exp((-spec.eaJPerMol / R) * (1 / (t + 273.15) - 1 / 333.15)) : 0
        expect(r.equivalentMinutes).toBeCloseTo((elapsed / MIN) * rate, 8)
      }),
    )
  })

  it('progress is monotonic in time and estimates are never in the past', () => {
    fc.assert(
      fc.property(mixed, nowArb, nowArb, (rows, x, y) => {
        const [n1, n2] = x <= y ? [x, y] : [y, x]
        const a = cureCredit(spec, rows, T0, T0 + n1)
        const b = cureCredit(spec, rows, T0, T0 + n2)
        expect(b.equivalentMinutes).toBeGreaterThanOrEqual(a.equivalentMinutes)
        if (b.completeAtMs !== null && !b.complete) expect(b.completeAtMs).toBeGreaterThanOrEqual(T0 + n2)
        if (b.complete) expect(b.completeAtMs).toBeLessThanOrEqual(T0 + n2)
      }),
    )
  })

  it('a hotter panel never earns less credit', () => {
    const pair = seriesArb({ panelTempC: bakeTemp }).chain((a) =>
      fc.array(fc.double({ min: 0, max: 20, noNaN: true }), { minLength: a.length, maxLength: a.length }).map((d) => ({
        a,
        b: a.map((s, i) => ({ ...s, panelTempC: (s.panelTempC as number) + (d[i] as number) })),
      })),
    )
    fc.assert(
      fc.property(pair, nowArb, ({ a, b }, now) => {
        expect(cureCredit(spec, b, T0, T0 + now).equivalentMinutes).toBeGreaterThanOrEqual(cureCredit(spec, a, T0, T0 + now).equivalentMinutes - 1e-12)
      }),
    )
  })

  it('gaps never create progress from nothing', () => {
    fc.assert(
      fc.property(mixed, fc.integer({ min: 1, max: 3 * 3600_000 }), (rows, extra) => {
        const last = (rows[rows.length - 1] as Sample).t
        const atHoldEnd = cureCredit(spec, rows, T0, last + 120_000)
        const later = cureCredit(spec, rows, T0, last + 120_000 + extra)
        expect(later.equivalentMinutes).toBe(atHoldEnd.equivalentMinutes)
        expect(later.uncertain).toBe(true)
        expect(later.completeAtMs === null || later.complete).toBe(true)
      }),
    )
  })
})
