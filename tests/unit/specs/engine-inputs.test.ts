import { describe, expect, it } from 'vitest'
import {
  activationEnergyFromQ10,
  activationEnergyFromSchedule,
  applicationWindowCheck,
  cureCredit,
  flashProgress,
  potLife,
  reducerAdvice,
  type Sample,
} from '#shared/cure'
import {
  activationEnergyOf,
  applicationLimits,
  curePoints,
  DEFAULT_MIN_CURE_TEMP_C,
  reducerBands,
  toAirDrySpec,
  toCureSpecs,
  toFlashSpec,
  toPotLifeSpec,
} from '#shared/specs/engine-inputs'
import { revisionContextIssues, revisionIssuesSI } from '#shared/schemas/spec'
import { DEMO_PRODUCTS } from '../../../server/domain/demo-specs'
import { fields } from './fixtures'

const T0 = Date.UTC(2026, 2, 1, 8, 0, 0)
const MIN = 60_000
const HOLD = { maxHoldMs: Number.POSITIVE_INFINITY }
const constant = (minutes: number, v: Omit<Sample, 't'>): Sample[] => [
  { t: T0, ...v },
  { t: T0 + minutes * MIN, ...v },
]
const solvent2K = { chemistry: 'solvent', components: 2 } as const
const waterborne1K = { chemistry: 'waterborne', components: 1 } as const

describe('toFlashSpec', () => {
  it('maps a Q10 solvent spec: flash min–max at the reference, Q10, recoat window', () => {
    const spec = toFlashSpec(solvent2K, fields({ q10: 2.5, recoatWindowMinutes: 45 }))
    expect(spec).toEqual({ chemistry: 'solvent', flashMinMinutes: 5, flashMaxMinutes: 10, refTempC: 20, q10: 2.5, recoatWindowMinutes: 45 })
    // 10 °C colder with Q10 2.5: 2.5 × longer.
    const r = flashProgress(spec, constant(1, { airTempC: 10 }), T0, T0 + MIN, HOLD)
    expect((r.readyAtMs! - T0) / MIN).toBeCloseTo(12.5, 6)
    expect((r.readyByMs! - T0) / MIN).toBeCloseTo(25, 6)
  })

  it('maps a table spec: the table drives the rate, not Q10', () => {
    const table = [
      { tempC: 10, minutes: 16 },
      { tempC: 20, minutes: 8 },
      { tempC: 30, minutes: 4 },
    ]
    const spec = toFlashSpec(solvent2K, fields({ flashTable: table, q10: 1.2 }))
    expect(spec.table).toEqual(table)
    // At 10 °C the table says 16 min where the reference (20 °C) says 8: twice as long, whatever Q10 says.
    const r = flashProgress(spec, constant(1, { airTempC: 10 }), T0, T0 + MIN, HOLD)
    expect(r.reasons).not.toContain('invalid-input')
    expect((r.readyAtMs! - T0) / MIN).toBeCloseTo(10, 6)
  })

  it('leaves out what the revision does not give (no nulls reach the engine)', () => {
    const spec = toFlashSpec(solvent2K, fields())
    expect(Object.values(spec)).not.toContain(null)
    expect(spec).not.toHaveProperty('recoatWindowMinutes')
    expect(spec).not.toHaveProperty('table')
    const wb = toFlashSpec(waterborne1K, fields())
    expect(wb).not.toHaveProperty('refRhPct')
    expect(flashProgress(wb, constant(1, { airTempC: 20, rhPct: 50, airflowMps: 0.3 }), T0, T0 + MIN, HOLD).rateNow).toBeCloseTo(1, 6)
  })

  it('maps the waterborne references and ignores a solvent table', () => {
    const spec = toFlashSpec(waterborne1K, fields({ wbRefRhPct: 60, wbRefAirflowMps: 0.4, wbAirflowExponent: 0.8, flashTable: [{ tempC: 10, minutes: 9 }, { tempC: 20, minutes: 5 }] }))
    expect(spec).toMatchObject({ chemistry: 'waterborne', refRhPct: 60, refAirflowMps: 0.4, airflowExponent: 0.8 })
    expect(spec).not.toHaveProperty('table')
    const humid = flashProgress(spec, constant(1, { airTempC: 20, rhPct: 80, airflowMps: 0.4 }), T0, T0 + MIN, HOLD)
    const ref = flashProgress(spec, constant(1, { airTempC: 20, rhPct: 60, airflowMps: 0.4 }), T0, T0 + MIN, HOLD)
    expect(ref.rateNow).toBeCloseTo(1, 6)
    expect(humid.rateNow).toBeCloseTo(0.5, 6) // VPD halves from 40 % to 20 % deficit
  })

  it("uses the flash before the next product for the 'before-next' stage", () => {
    const spec = toFlashSpec(solvent2K, fields({ recoatWindowMinutes: 12 }), 'before-next')
    expect(spec).toMatchObject({ flashMinMinutes: 15, flashMaxMinutes: 15 })
    // A 12-minute window ends before the 15-minute flash: not passed to the engine (it would be invalid).
    expect(spec).not.toHaveProperty('recoatWindowMinutes')
  })
})

describe('toPotLifeSpec', () => {
  it('maps pot life at the reference with the revision Q10, null without one', () => {
    const spec = toPotLifeSpec(solvent2K, fields({ potLifeMinutes: 60, q10: 2 }))
    expect(spec).toEqual({ potLifeMinutes: 60, refTempC: 20, q10: 2 })
    const r = potLife(spec!, constant(1, { airTempC: 30 }), T0, T0 + MIN, HOLD)
    expect((r.expiresAtMs! - T0) / MIN).toBeCloseTo(30, 6)
    expect(toPotLifeSpec(waterborne1K, fields())).toBeNull()
  })
})

describe('cure specs and activation energy', () => {
  it('Ea from two bake points round-trips: the second schedule earns the first one’s requirement', () => {
    const rev = fields({
      bakeSchedules: [
        { objectTempC: 60, minutes: 30 },
        { objectTempC: 40, minutes: 120 },
      ],
      minCureTempC: 10,
    })
    const ea = activationEnergyOf(rev)
    expect(ea.source).toBe('schedule')
    expect(ea.eaJPerMol).toBeCloseTo(activationEnergyFromSchedule({ tempC: 40, minutes: 120 }, { tempC: 60, minutes: 30 }), 6)
    const [first, second] = toCureSpecs(solvent2K, rev)
    expect(first).toEqual({ specTempC: 60, requiredMinutes: 30, minCureTempC: 10, eaJPerMol: ea.eaJPerMol })
    // Hold the panel at the second point's temperature for its time → the first point's 30 min of credit.
    const r = cureCredit(first!, constant(120, { panelTempC: 40 }), T0, T0 + 120 * MIN, HOLD)
    expect(r.equivalentMinutes).toBeCloseTo(30, 3)
    expect(r.complete).toBe(true)
    const back = cureCredit(second!, constant(30, { panelTempC: 60 }), T0, T0 + 30 * MIN, HOLD)
    expect(back.equivalentMinutes).toBeCloseTo(120, 3)
  })

  it('uses the air-dry time to sand / polish as the second point when there is one bake', () => {
    const rev = fields({ bakeSchedules: [{ objectTempC: 60, minutes: 30 }], sandPolishMinutes: 960, minCureTempC: 10 })
    expect(curePoints(rev).map((p) => p.source)).toEqual(['air-dry', 'bake'])
    const ea = activationEnergyOf(rev)
    expect(ea.source).toBe('schedule')
    // ≈ 70 kJ/mol: R·ln(32) / (1/293.15 − 1/333.15)
    expect(ea.eaJPerMol / 1000).toBeCloseTo(70.3, 0)
    const [bake] = toCureSpecs(solvent2K, rev)
    const r = cureCredit(bake!, constant(960, { panelTempC: 20 }), T0, T0 + 960 * MIN, HOLD)
    expect(r.equivalentMinutes).toBeCloseTo(30, 3)
  })

  it('falls back to Q10 at the reference temperature with a single cure point', () => {
    const rev = fields({ bakeSchedules: [{ objectTempC: 60, minutes: 30 }], minCureTempC: 15, q10: 2.2 })
    const ea = activationEnergyOf(rev)
    expect(ea).toEqual({ eaJPerMol: activationEnergyFromQ10(2.2, 20), source: 'q10', points: null })
    expect(toCureSpecs(solvent2K, rev)).toEqual([{ specTempC: 60, requiredMinutes: 30, minCureTempC: 15, eaJPerMol: ea.eaJPerMol }])
  })

  it('gives no cure spec without bake schedules, and a default minimum when one is missing', () => {
    expect(toCureSpecs(solvent2K, fields())).toEqual([])
    const [spec] = toCureSpecs(solvent2K, fields({ bakeSchedules: [{ objectTempC: 60, minutes: 30 }] }))
    expect(spec!.minCureTempC).toBe(DEFAULT_MIN_CURE_TEMP_C)
  })

  it('stretches an air-dry time by temperature with the same Ea', () => {
    const rev = fields({ bakeSchedules: [{ objectTempC: 60, minutes: 30 }], sandPolishMinutes: 960, minCureTempC: 10 })
    const spec = toAirDrySpec(rev, rev.sandPolishMinutes)!
    const warm = cureCredit(spec, constant(1, { panelTempC: 30 }), T0, T0 + MIN, HOLD)
    expect((warm.completeAtMs! - T0) / MIN).toBeLessThan(960)
    expect(toAirDrySpec(rev, null)).toBeNull()
  })
})

describe('reducer bands and application limits', () => {
  it('maps open-ended bands to ±Infinity for the engine', () => {
    const rev = fields({
      reducerBands: [
        { fromC: null, toC: 18, grade: 'Fast' },
        { fromC: 18, toC: 25, grade: 'Standard' },
        { fromC: 25, toC: null, grade: 'Slow' },
      ],
    })
    const bands = reducerBands(rev)
    expect(bands[0]).toEqual({ minC: Number.NEGATIVE_INFINITY, maxC: 18, grade: 'Fast' })
    expect(reducerAdvice(bands, -5)).toBe('Fast')
    expect(reducerAdvice(bands, 18)).toBe('Standard')
    expect(reducerAdvice(bands, 40)).toBe('Slow')
  })

  it('maps only the limits the TDS gives', () => {
    expect(applicationLimits(fields({ minAirTempC: 15, maxRhPct: 80 }))).toEqual({ minTempC: 15, maxRhPct: 80 })
    const check = applicationWindowCheck(applicationLimits(fields({ minAirTempC: 15, maxRhPct: 80 })), { airTempC: 12, rhPct: 50 })
    expect(check.problems).toEqual([{ channel: 'airTempC', value: 12, limit: 15, kind: 'below' }])
  })
})

describe('demo products', () => {
  it('each passes the revision schema and the product rules', () => {
    for (const d of DEMO_PRODUCTS) {
      expect([...revisionIssuesSI(d.revision), ...revisionContextIssues(d.product, d.revision)], d.product.name).toEqual([])
    }
  })

  it('each maps to valid engine inputs', () => {
    for (const d of DEMO_PRODUCTS) {
      const flash = flashProgress(toFlashSpec(d.product, d.revision), constant(1, { airTempC: 20, rhPct: 50, airflowMps: 0.3 }), T0, T0 + MIN, HOLD)
      expect(flash.reasons, d.product.name).not.toContain('invalid-input')
      for (const c of toCureSpecs(d.product, d.revision)) {
        expect(cureCredit(c, constant(1, { panelTempC: 60 }), T0, T0 + MIN, HOLD).reasons, d.product.name).not.toContain('invalid-input')
      }
    }
  })
})
