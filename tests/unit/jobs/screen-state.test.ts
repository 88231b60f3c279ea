import { describe, expect, it } from 'vitest'
import { activeJobOf, assembleScreenState, type ScreenInput } from '../../../server/domain/booth-screen'
import type { LiveBoothState } from '../../../server/telemetry/live-hub'
import { CLEAR, coat, job, MIN, mix, REFERENCE, REVISIONS, series, steps, T0 } from './fixtures'

function live(atMs: number, airTempC = 20): LiveBoothState {
  const iso = new Date(atMs).toISOString()
  return {
    boothId: 1,
    reading: { boothId: 1, ts: iso, receivedAt: iso, airTempC, rhPct: 50, panelTempC: 20, airflowMps: 0.3, boothDpPa: 6, intakeFilterDpPa: null, exhaustFilterDpPa: null, heaterOn: false, dewPointC: 9.3, dewPointMarginC: 10.7 },
    mode: 'flash',
    modeSince: iso,
    deviceStatus: 'online',
  }
}

function input(over: Partial<ScreenInput>): ScreenInput {
  return {
    nowMs: T0,
    booth: { id: 1, name: 'Downdraft booth 1', kind: 'downdraft', hasHeater: true },
    units: { temperature: 'C', airflow: 'm/s', pressure: 'Pa' },
    live: live(T0),
    job: job(),
    steps: steps(),
    coats: [],
    revisions: REVISIONS,
    mixes: [],
    samples: [],
    people: [{ id: 4, name: 'Jun Halloway', role: 'painter' }],
    names: new Map([[4, 'Jun Halloway']]),
    ...over,
  }
}

describe('booth screen state', () => {
  // Primer, first coat finished at T0; flash between coats 5–10 min at 20 °C, Q10 = 2.
  const c1 = coat(11, 1, T0 - 3 * MIN, T0)

  it('counts the flash down from stored readings at reference conditions', () => {
    const now = T0 + 2 * MIN
    const s = assembleScreenState(input({ nowMs: now, live: live(now), coats: [c1], samples: series(T0 - 5 * MIN, now, REFERENCE) }))
    expect(s.flash).toMatchObject({ stage: 'between-coats', ready: false, uncertain: false })
    expect(s.flash!.progress).toBeCloseTo(0.4, 6)
    expect(Date.parse(s.flash!.readyAt!)).toBeCloseTo(T0 + 5 * MIN, -1)
    expect(Date.parse(s.flash!.readyBy!)).toBeCloseTo(T0 + 10 * MIN, -1)
    expect(s.nextCoat).toMatchObject({ stepId: 11, coatNumber: 2, newProduct: false })
    expect(s.checks.needsReason).toEqual(['flash_not_complete'])
    expect(s.coatInProgress).toBeNull()
    expect(s.conditions.stale).toBe(false)
  })

  it('moves the ready time earlier when the booth warms up, and turns ready', () => {
    const now = T0 + 2 * MIN
    const cool = assembleScreenState(input({ nowMs: now, coats: [c1], samples: series(T0 - 5 * MIN, now, REFERENCE) }))
    // 30 °C from 1 min on: rate 2 (Q10 = 2 per 10 °C).
    const warm = [...series(T0 - 5 * MIN, T0 + 50_000, REFERENCE), ...series(T0 + MIN, now, { ...REFERENCE, airTempC: 30, panelTempC: 28 })]
    const s = assembleScreenState(input({ nowMs: now, coats: [c1], samples: warm }))
    expect(Date.parse(s.flash!.readyAt!)).toBeLessThan(Date.parse(cool.flash!.readyAt!))
    // 1 min at rate 1 + 1 min at rate 2 = 3 equivalent min; 2 left at rate 2 → 1 min from now.
    expect(Date.parse(s.flash!.readyAt!)).toBeCloseTo(now + MIN, -2)
    const later = now + 65_000
    const done = assembleScreenState(input({ nowMs: later, coats: [c1], samples: [...warm, ...series(now + 10_000, later, { ...REFERENCE, airTempC: 30, panelTempC: 28 })] }))
    expect(done.flash).toMatchObject({ ready: true })
    expect(done.checks.needsReason).toEqual([])
  })

  it('is the same for the same stored rows (a reload, a restart, another instance)', () => {
    const now = T0 + 2 * MIN
    const a = assembleScreenState(input({ nowMs: now, coats: [c1], samples: series(T0 - 5 * MIN, now, REFERENCE) }))
    const b = assembleScreenState(input({ nowMs: now, coats: [structuredClone(c1)], samples: series(T0 - 5 * MIN, now, REFERENCE).reverse() }))
    expect(b).toEqual(a)
  })

  it('uses the flash before the next product once a step is complete', () => {
    const c2 = coat(11, 2, T0 + 6 * MIN, T0 + 8 * MIN)
    const now = T0 + 10 * MIN
    const s = assembleScreenState(input({ nowMs: now, coats: [c1, c2], samples: series(T0 - 5 * MIN, now, REFERENCE) }))
    expect(s.flash).toMatchObject({ stage: 'before-next', flashMinMinutes: 15, ready: false })
    expect(Date.parse(s.flash!.readyAt!)).toBeCloseTo(T0 + 23 * MIN, -1)
    expect(s.nextCoat).toMatchObject({ stepId: 12, coatNumber: 1, newProduct: true, product: 'Clear binder wet bed' })
    expect(s.plan.map((p) => [p.position, p.coatsDone, p.current])).toEqual([
      [1, 2, false],
      [2, 0, true],
      [3, 0, false],
      [4, 0, false],
    ])
  })

  it('shows a coat being sprayed instead of a countdown', () => {
    const open = coat(11, 2, T0 + 6 * MIN, null)
    const s = assembleScreenState(input({ nowMs: T0 + 7 * MIN, coats: [c1, open], samples: series(T0, T0 + 7 * MIN, REFERENCE) }))
    expect(s.flash).toBeNull()
    expect(s.coatInProgress).toMatchObject({ id: open.id, coatNumber: 2, painter: 'Jun Halloway' })
    // The application window shown is the one of the product being sprayed.
    expect(s.checks.applicationWindow).toMatchObject({ product: '2K high-build primer surfacer', ok: true })
    expect(s.checks.needsReason).toEqual([])
  })

  it('marks the data stale 30 s after the last reading, and the flash uncertain after the 2 min hold', () => {
    const now = T0 + 5 * MIN
    const samples = series(T0 - 5 * MIN, T0 + 2 * MIN, REFERENCE)
    const s = assembleScreenState(input({ nowMs: now, live: live(T0 + 2 * MIN), coats: [c1], samples }))
    expect(s.conditions.stale).toBe(true)
    expect(s.flash!.uncertain).toBe(true)
    expect(s.flash!.reasons).toContain('data-gap')
    expect(assembleScreenState(input({ nowMs: T0 + 29_000, live: live(T0) })).conditions.stale).toBe(false)
    expect(assembleScreenState(input({ nowMs: T0 + 31_000, live: live(T0) })).conditions.stale).toBe(true)
    expect(assembleScreenState(input({ live: null })).conditions.stale).toBe(true)
  })

  it('gives open mixes their pot life on the booth temperature, and reducer advice now', () => {
    const now = T0 + 30 * MIN
    const s = assembleScreenState(input({ nowMs: now, coats: [], mixes: [mix(CLEAR.id, T0)], samples: series(T0 - 5 * MIN, now, REFERENCE) }))
    expect(s.mixes).toHaveLength(1)
    // Demo clearcoat: 120 min pot life at 20 °C.
    expect(s.mixes[0]!.potLife!.usedFraction).toBeCloseTo(0.25, 6)
    expect(Date.parse(s.mixes[0]!.potLife!.expiresAt!)).toBeCloseTo(T0 + 120 * MIN, -1)
    // Next coat is the primer: 18–25 °C → Standard.
    expect(s.reducer).toMatchObject({ advised: 'Standard', airTempC: 20 })
    expect(s.twoK).toBe(true)
    expect(s.mixChoices[0]!.product).toBe('2K high-build primer surfacer')
  })

  it('picks the job with a coat in progress, else in the booth, curing, planned', () => {
    const a = job({ id: 1, status: 'planned' })
    const b = job({ id: 2, status: 'curing' })
    const c = job({ id: 3, status: 'in_booth' })
    expect(activeJobOf([a, b, c], null)?.id).toBe(3)
    expect(activeJobOf([a, b], null)?.id).toBe(2)
    expect(activeJobOf([a], null)?.id).toBe(1)
    expect(activeJobOf([a, b, c], 1)?.id).toBe(1)
    expect(activeJobOf([], null)).toBeNull()
  })
})
