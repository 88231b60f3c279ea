import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { FlashSpec, Sample } from '#shared/cure'
import { flashProgress, flashTableMinutes, tableFlashRate, vapourPressureDeficitPa, waterborneFlashRate } from '#shared/cure'
import { airflow, boothTemp, constantSeries, MIN, rh, seriesArb, T0 } from './helpers'

const solvent: FlashSpec = { chemistry: 'solvent', flashMinMinutes: 10, flashMaxMinutes: 15 }
const waterborne: FlashSpec = { chemistry: 'waterborne', flashMinMinutes: 8, flashMaxMinutes: 12 }
// A decreasing three-row TDS table (invented): 10 °C 20 min, 20 °C 10 min, 30 °C 5 min.
const table = [
  { tempC: 30, minutes: 5 },
  { tempC: 10, minutes: 20 },
  { tempC: 20, minutes: 10 },
]
const ref = { refTempC: 20, refRhPct: 50, refAirflowMps: 0.3, airflowExponent: 0.5, minAirflowMps: 0.1 }

describe('solvent-borne flash (Q10 rule, DESIGN §6: r = Q10^((T − Tref)/10), Q10 = 2 common practice)', () => {
  it('at 30 °C the rate doubles: a 10 min flash is ready after exactly 5 min', () => {
    const rows = constantSeries(T0, 30_000, 20, { airTempC: 30 })
    const r = flashProgress(solvent, rows, T0, T0 + 4 * MIN)
    expect(r.rateNow).toBeCloseTo(2, 12) // 2^((30 − 20)/10) = 2
    expect(r.progress).toBeCloseTo(0.8, 12) // 4 min · 2 / 10
    expect(r.ready).toBe(false)
    expect(r.readyAtMs).toBeCloseTo(T0 + 5 * MIN, 3) // now + (1 − 0.8)·10/2 min
    expect(r.readyByMs).toBeCloseTo(T0 + 7.5 * MIN, 3) // 15 min / 2
    const later = flashProgress(solvent, rows, T0, T0 + 9 * MIN)
    expect(later.ready).toBe(true)
    expect(later.readyAtMs).toBeCloseTo(T0 + 5 * MIN, 3) // the exact crossing, in the past
    expect(later.readyByMs).toBeCloseTo(T0 + 7.5 * MIN, 3)
    expect(later.recoatWindowPassed).toBe(true)
  })

  it('uses the spec Q10 and reference temperature (Q10 1.5, Tref 25 °C, at 15 °C → 1.5^−1)', () => {
    const rows = constantSeries(T0, 30_000, 20, { airTempC: 15 })
    const r = flashProgress({ ...solvent, q10: 1.5, refTempC: 25 }, rows, T0, T0 + 6 * MIN)
    expect(r.rateNow).toBeCloseTo(1 / 1.5, 12)
    expect(r.progress).toBeCloseTo((6 / 1.5) / 10, 12)
  })

  // Hand-worked log-linear interpolation: between (20 °C, 10 min) and (30 °C, 5 min), 25 °C gives
  // exp((ln 10 + ln 5)/2) = √50 = 7.0711 min; outside the table the end rows hold (clamped).
  it('interpolates a TDS table log-linearly and clamps at the ends', () => {
    expect(flashTableMinutes(table, 25)).toBeCloseTo(Math.sqrt(50), 10)
    expect(flashTableMinutes(table, 12.5)).toBeCloseTo(Math.exp(Math.log(20) + 0.25 * Math.log(10 / 20)), 10)
    expect(flashTableMinutes(table, 0)).toBe(20)
    expect(flashTableMinutes(table, 45)).toBe(5)
    expect(tableFlashRate(table, 25, 20)).toBeCloseTo(10 / Math.sqrt(50), 10)
    const rows = constantSeries(T0, 30_000, 40, { airTempC: 25 })
    const r = flashProgress({ ...solvent, table }, rows, T0, T0 + 3 * MIN)
    expect(r.progress).toBeCloseTo((3 * (10 / Math.sqrt(50))) / 10, 12)
  })

  it('rejects a table that is ambiguous or gets slower when warmer', () => {
    expect(flashTableMinutes([{ tempC: 20, minutes: 5 }, { tempC: 20, minutes: 6 }], 20)).toBeNaN()
    expect(flashTableMinutes([{ tempC: 10, minutes: 5 }, { tempC: 20, minutes: 6 }], 15)).toBeNaN()
    expect(flashProgress({ ...solvent, table: [{ tempC: 10, minutes: 5 }] }, [], T0, T0).progress).toBeNaN()
  })
})

describe('waterborne flash (r = (VPD/VPD_ref)·(v/v_ref)^0.5; Sh ∝ Re^0.5, Incropera, from memory)', () => {
  it('is 1 at the reference conditions and follows the closed form elsewhere', () => {
    expect(waterborneFlashRate(20, 50, 0.3, ref)).toBeCloseTo(1, 12)
    const expected = (vapourPressureDeficitPa(25, 40) / vapourPressureDeficitPa(20, 50)) * Math.sqrt(0.5 / 0.3)
    expect(waterborneFlashRate(25, 40, 0.5, ref)).toBeCloseTo(expected, 12)
    // Hand check of the VPD ratio with Magnus e_s: e_s(25) = 3161.7 Pa, e_s(20) = 2333.4 Pa →
    // (3161.7·0.6)/(2333.4·0.5) = 1.6259; × √(5/3) = 1.2910 → 2.0990.
    expect(waterborneFlashRate(25, 40, 0.5, ref)).toBeCloseTo(2.099, 3)
  })

  it('missing airflow assumes the reference velocity and says so', () => {
    const rows = constantSeries(T0, 30_000, 20, { airTempC: 20, rhPct: 50 })
    const r = flashProgress(waterborne, rows, T0, T0 + 4 * MIN)
    expect(r.progress).toBeCloseTo(4 / 8, 12)
    expect(r.airflowAssumed).toBe(true)
    expect(r.uncertain).toBe(true)
    expect(r.reasons).toContain('airflow-assumed')
  })

  it('still air counts at the 0.1 m/s floor, and saturated air stops the clock', () => {
    const still = flashProgress(waterborne, constantSeries(T0, 30_000, 20, { airTempC: 20, rhPct: 50, airflowMps: 0 }), T0, T0 + 4 * MIN)
    expect(still.rateNow).toBeCloseTo(Math.sqrt(0.1 / 0.3), 12)
    const wet = flashProgress(waterborne, constantSeries(T0, 30_000, 20, { airTempC: 20, rhPct: 100, airflowMps: 0.3 }), T0, T0 + 4 * MIN)
    expect(wet.progress).toBe(0)
    expect(wet.readyAtMs).toBeNull()
    expect(wet.reasons).toContain('no-progress-now')
  })

  it('ignores a temperature table for waterborne, with a reason', () => {
    const r = flashProgress({ ...waterborne, table }, constantSeries(T0, 30_000, 4, { airTempC: 20, rhPct: 50, airflowMps: 0.3 }), T0, T0 + MIN)
    expect(r.progress).toBeCloseTo(1 / 8, 12)
    expect(r.reasons).toContain('table-ignored')
  })

  it('uses recoatWindowMinutes for the window end when given', () => {
    const rows = constantSeries(T0, 30_000, 20, { airTempC: 20, rhPct: 50, airflowMps: 0.3 })
    const r = flashProgress({ ...waterborne, recoatWindowMinutes: 30 }, rows, T0, T0 + 2 * MIN)
    expect(r.recoatWindowEndsAtMs).toBeCloseTo(T0 + 30 * MIN, 3)
    expect(r.readyByMs).toBeCloseTo(T0 + 12 * MIN, 3)
  })
})

describe('flash properties (fast-check)', () => {
  const nowArb = fc.integer({ min: 0, max: 40 * 30_000 })

  it('constant conditions give the closed form', () => {
    fc.assert(
      fc.property(boothTemp, fc.double({ min: 1, max: 3, noNaN: true }), fc.integer({ min: 1, max: 30 }), fc.integer({ min: 0, max: 60 * MIN }), (t, q10, f, elapsed) => {
        const rows = constantSeries(T0, 30_000, Math.ceil(elapsed / 30_000) + 1, { airTempC: t })
        const r = flashProgress({ ...solvent, flashMinMinutes: f, flashMaxMinutes: 2 * f, q10 }, rows, T0, T0 + elapsed)
        const rate = q10 ** ((t - 20) / 10)
        expect(r.progress).toBeCloseTo(((elapsed / MIN) * rate) / f, 9)
        const readyAt = r.ready ? T0 + (f / rate) * MIN : T0 + elapsed + ((f - (elapsed / MIN) * rate) / rate) * MIN
        expect(r.readyAtMs ?? Number.NaN).toBeCloseTo(readyAt, 0)
        expect(r.uncertain).toBe(false)
      }),
    )
  })

  it('a warmer booth never lengthens a solvent-borne flash (Q10 and table)', () => {
    const pair = seriesArb({ airTempC: boothTemp }).chain((a) =>
      fc.array(fc.double({ min: 0, max: 15, noNaN: true }), { minLength: a.length, maxLength: a.length }).map((d) => ({
        a,
        b: a.map((s, i) => ({ ...s, airTempC: (s.airTempC as number) + (d[i] as number) })),
      })),
    )
    fc.assert(
      fc.property(pair, nowArb, fc.boolean(), ({ a, b }, now, useTable) => {
        const spec = useTable ? { ...solvent, table } : solvent
        const ra = flashProgress(spec, a, T0, T0 + now)
        const rb = flashProgress(spec, b, T0, T0 + now)
        expect(rb.progress).toBeGreaterThanOrEqual(ra.progress - 1e-12)
        if (ra.readyAtMs !== null && rb.readyAtMs !== null) expect(rb.readyAtMs).toBeLessThanOrEqual(ra.readyAtMs + 1e-6)
        if (ra.readyAtMs !== null) expect(rb.readyAtMs).not.toBeNull()
      }),
    )
  })

  it('a more humid or stiller booth never shortens a waterborne flash', () => {
    const pair = seriesArb({ airTempC: boothTemp, rhPct: rh, airflowMps: airflow }).chain((a) =>
      fc.array(fc.record({ drh: fc.double({ min: 0, max: 30, noNaN: true }), dv: fc.double({ min: 0, max: 1, noNaN: true }) }), { minLength: a.length, maxLength: a.length }).map((d) => ({
        a,
        b: a.map((s, i) => ({
          ...s,
          rhPct: Math.min(100, (s.rhPct as number) + (d[i]?.drh as number)),
          airflowMps: Math.max(0, (s.airflowMps as number) - (d[i]?.dv as number)),
        })),
      })),
    )
    fc.assert(
      fc.property(pair, nowArb, ({ a, b }, now) => {
        const ra = flashProgress(waterborne, a, T0, T0 + now)
        const rb = flashProgress(waterborne, b, T0, T0 + now)
        expect(rb.progress).toBeLessThanOrEqual(ra.progress + 1e-12)
        if (rb.readyAtMs !== null) {
          expect(ra.readyAtMs).not.toBeNull()
          expect(rb.readyAtMs).toBeGreaterThanOrEqual((ra.readyAtMs as number) - 1e-6)
        }
      }),
    )
  })

  // Readings with random holes (nulls) and an arbitrary now: projections are never before now; the range is ordered.
  it('estimates are never in the past', () => {
    const holey = seriesArb({
      airTempC: fc.oneof(boothTemp, fc.constant(Number.NaN)),
      rhPct: rh,
      airflowMps: fc.oneof(airflow, fc.constant(Number.NaN)),
    }).map((rows) => rows.filter((_, i) => i % 3 !== 1 || i > 20))
    fc.assert(
      fc.property(holey, nowArb, fc.constantFrom<FlashSpec>(solvent, waterborne), (rows, now, spec) => {
        const r = flashProgress(spec, rows, T0, T0 + now)
        if (r.readyAtMs === null) return
        if (r.ready) {
          expect(r.readyAtMs).toBeLessThanOrEqual(T0 + now)
          expect(r.readyAtMs).toBeGreaterThanOrEqual(T0)
        } else expect(r.readyAtMs).toBeGreaterThanOrEqual(T0 + now)
        if (r.readyByMs !== null) expect(r.readyByMs).toBeGreaterThanOrEqual(r.readyAtMs - 1e-6)
        if (r.recoatWindowEndsAtMs !== null) expect(r.recoatWindowEndsAtMs).toBeGreaterThanOrEqual(r.readyAtMs - 1e-6)
      }),
    )
  })

  it('progress is monotonic in time', () => {
    fc.assert(
      fc.property(seriesArb({ airTempC: boothTemp, rhPct: rh, airflowMps: airflow }), nowArb, nowArb, fc.constantFrom<FlashSpec>(solvent, waterborne), (rows, x, y, spec) => {
        const [n1, n2] = x <= y ? [x, y] : [y, x]
        expect(flashProgress(spec, rows, T0, T0 + n2).progress).toBeGreaterThanOrEqual(flashProgress(spec, rows, T0, T0 + n1).progress)
      }),
    )
  })

  // After the last reading plus the 2 min hold, waiting longer adds nothing and the result says so.
  it('gaps never create progress from nothing', () => {
    fc.assert(
      fc.property(seriesArb({ airTempC: boothTemp, rhPct: rh, airflowMps: airflow }), fc.integer({ min: 1, max: 3 * 3600_000 }), fc.constantFrom<FlashSpec>(solvent, waterborne), (rows, extra, spec) => {
        const last = (rows[rows.length - 1] as Sample).t
        const atHoldEnd = flashProgress(spec, rows, T0, last + 120_000)
        const muchLater = flashProgress(spec, rows, T0, last + 120_000 + extra)
        expect(muchLater.progress).toBe(atHoldEnd.progress)
        expect(muchLater.uncertain).toBe(true)
        expect(muchLater.reasons).toContain('data-gap')
        expect(flashProgress(spec, [], T0, T0 + extra).progress).toBe(0)
      }),
    )
  })
})
