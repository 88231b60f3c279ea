import { createRequire } from 'node:module'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  createBoothModel,
  rhFromVapour,
  saturationVapourPressureHpa,
  type BoothModel,
  type BoothModelOptions,
  type BoothStep,
} from '../../../simulator/model'
import { MODES, type Mode } from '../../../simulator/wire'

const START = Date.UTC(2026, 11, 1, 8, 0, 0)

function model(overrides: Partial<BoothModelOptions> = {}): BoothModel {
  return createBoothModel({ booth: 'downdraft-1', seed: 1, speed: 1, startMs: START, ...overrides })
}

function run(m: BoothModel, steps: number, stepMs = 1000, from = START): BoothStep[] {
  const out: BoothStep[] = []
  for (let i = 1; i <= steps; i++) out.push(m.next(from + i * stepMs))
  return out
}

/** Consecutive distinct modes, starting with the mode before the first step. */
function modeSequence(initial: Mode, steps: readonly BoothStep[]): Mode[] {
  const seq: Mode[] = [initial]
  for (const s of steps) if (s.mode !== seq[seq.length - 1]) seq.push(s.mode)
  return seq
}

/** Runs from idle until the booth is back in idle after one job; returns the steps of that cycle. */
function oneCycle(m: BoothModel, stepMs: number, maxSteps: number): BoothStep[] {
  const steps: BoothStep[] = []
  let leftIdle = false
  for (let i = 1; i <= maxSteps; i++) {
    const s = m.next(START + i * stepMs)
    steps.push(s)
    if (s.mode !== 'idle') leftIdle = true
    else if (leftIdle) return steps
  }
  throw new Error(`no complete cycle within ${maxSteps} steps`)
}

describe('Magnus saturation vapour pressure', () => {
  // Cross-check against psychrolib (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 5/6, Hyland–Wexler).
  const require = createRequire(import.meta.url)
  const psychrolib = require('psychrolib') as { SI: number; SetUnitSystem(u: number): void; GetSatVapPres(t: number): number }
  psychrolib.SetUnitSystem(psychrolib.SI)

  it.each([0, 10, 20, 30, 45, 60])('matches psychrolib within half a percent at %i °C', (t) => {
    const ashraeHpa = psychrolib.GetSatVapPres(t) / 100
    expect(Math.abs(saturationVapourPressureHpa(t) / ashraeHpa - 1)).toBeLessThan(0.005)
  })

  it('keeps absolute humidity: air at 50 % and 20 °C heated to 60 °C is near 7 % RH', () => {
    const e = 0.5 * saturationVapourPressureHpa(20)
    expect(rhFromVapour(e, 20)).toBeCloseTo(50, 6)
    expect(rhFromVapour(e, 60)).toBeGreaterThan(5)
    expect(rhFromVapour(e, 60)).toBeLessThan(7)
    expect(rhFromVapour(e, -20)).toBe(100)
  })
})

describe('determinism', () => {
  it('gives an identical series for the same seed and options', () => {
    const opts: Partial<BoothModelOptions> = { seed: 77, speed: 30, faults: 0.05 }
    const a = run(model(opts), 2000).map((s) => s.payload)
    const b = run(model(opts), 2000).map((s) => s.payload)
    expect(a).toEqual(b)
    expect(a.filter((p) => p !== null).length).toBeGreaterThan(1900)
  })

  it('repeats the same values for a later start; only the timestamps shift', () => {
    const later = START + 3 * 86_400_000 + 12_345
    const a = run(model({ seed: 31, speed: 30 }), 1000)
    const b = run(model({ seed: 31, speed: 30, startMs: later }), 1000, 1000, later)
    const strip = (s: BoothStep): unknown => (s.reading ? { ...s.reading, ts: undefined } : null)
    expect(b.map(strip)).toEqual(a.map(strip))
    expect(Date.parse(b[0]?.reading?.ts ?? '') - Date.parse(a[0]?.reading?.ts ?? '')).toBe(later - START)
  })

  it('gives different series for different seeds, and for different booths with one seed', () => {
    const series = (o: Partial<BoothModelOptions>): (string | null)[] => run(model({ speed: 30, dropouts: false, ...o }), 500).map((s) => s.payload)
    const a = series({ seed: 1 })
    const b = series({ seed: 2 })
    const c = series({ seed: 1, booth: 'downdraft-2' })
    const differing = (x: (string | null)[], y: (string | null)[]): number => x.filter((p, i) => p !== y[i]).length
    expect(differing(a, b)).toBeGreaterThan(450)
    expect(differing(a, c)).toBeGreaterThan(450)
  })

  it('does not change the measured series when faults are turned on', () => {
    const clean = run(model({ seed: 5, speed: 20 }), 1500)
    const faulty = run(model({ seed: 5, speed: 20, faults: 0.2 }), 1500)
    expect(faulty.map((s) => s.reading)).toEqual(clean.map((s) => s.reading))
    expect(faulty.filter((s) => s.fault !== undefined).length).toBeGreaterThan(200)
  })
})

describe('booth cycle', () => {
  it('runs a downdraft booth through every mode in order: idle, coats of spray/flash, bake, cool, idle', () => {
    for (const seed of [1, 2, 3]) {
      const m = model({ seed, initialPhase: 'idle', dropouts: false })
      const steps = oneCycle(m, 1000, 6 * 3600)
      const modes = modeSequence('idle', steps).join(',')
      expect(modes).toMatch(/^idle(,spray,flash){2,4},bake,cool,idle$/)
      // Every mode of the wire format appears.
      for (const mode of MODES) expect(modes).toContain(mode)
      // modeChanged is reported exactly at the changes.
      const changes = steps.filter((s) => s.modeChanged !== undefined)
      expect(changes.map((s) => s.modeChanged)).toEqual(modeSequence('idle', steps).slice(1))
      for (const s of changes) expect(s.modeChanged).toBe(s.mode)
    }
  })

  it('holds the panel near 60 °C for about 30 minutes at speed 1, heater on only in bake', () => {
    const m = model({ seed: 4, initialPhase: 'idle', dropouts: false })
    const steps = oneCycle(m, 1000, 6 * 3600)
    const hold = steps.filter((s) => s.phase === 'bakeHold')
    expect(hold.length).toBeGreaterThan(29 * 60)
    expect(hold.length).toBeLessThan(31 * 60)
    for (const s of hold.slice(120)) {
      expect(s.reading?.panelTempC).toBeGreaterThan(58)
      expect(s.reading?.panelTempC).toBeLessThan(62)
    }
    for (const s of steps) expect(s.reading?.heaterOn).toBe(s.mode === 'bake')
    // RH falls as the air heats (absolute humidity kept): well under 15 % in the hold.
    expect(Math.max(...hold.map((s) => s.reading?.rhPct ?? 100))).toBeLessThan(15)
  })

  it('lags the panel temperature behind the air temperature during the bake ramp', () => {
    const m = model({ seed: 8, initialPhase: 'idle', dropouts: false })
    const steps = oneCycle(m, 1000, 6 * 3600)
    const ramp = steps.filter((s) => s.phase === 'bakeRamp')
    expect(ramp.length).toBeGreaterThan(5 * 60)
    // After the first minute the air is clearly warmer than the panel.
    for (const s of ramp.slice(60)) {
      const air = s.reading?.airTempC ?? Number.NaN
      const panel = s.reading?.panelTempC ?? Number.NaN
      expect(air - panel).toBeGreaterThan(1)
    }
    const firstAbove = (key: 'airTempC' | 'panelTempC', t: number): number => steps.findIndex((s) => (s.reading?.[key] ?? 0) > t)
    expect(firstAbove('airTempC', 45)).toBeGreaterThan(0)
    expect(firstAbove('panelTempC', 45) - firstAbove('airTempC', 45)).toBeGreaterThan(60)
  })

  it('cycles the prep deck without bake, cool or heater', () => {
    const m = model({ booth: 'prep-deck', seed: 3, initialPhase: 'idle', dropouts: false })
    expect(m.kind).toBe('prep-deck')
    const steps = oneCycle(m, 1000, 6 * 3600)
    expect(modeSequence('idle', steps).join(',')).toMatch(/^idle(,spray,flash){1,3},idle$/)
    for (const s of steps) expect(s.reading?.heaterOn).toBeUndefined()
    const sprayFlow = steps.filter((s) => s.mode === 'spray').slice(-30).map((s) => s.reading?.airflowMps ?? 0)
    expect(Math.max(...sprayFlow)).toBeLessThan(0.4)
  })

  it('has high airflow in spray (0.4–0.5 m/s) and a slightly positive booth pressure', () => {
    const steps = run(model({ seed: 11, speed: 10, dropouts: false }), 3000)
    const spray = steps.filter((s, i) => s.mode === 'spray' && steps[i - 10]?.mode === 'spray')
    expect(spray.length).toBeGreaterThan(50)
    for (const s of spray) {
      expect(s.reading?.airflowMps).toBeGreaterThanOrEqual(0.38)
      expect(s.reading?.airflowMps).toBeLessThanOrEqual(0.52)
    }
    const idle = steps.filter((s, i) => s.mode === 'idle' && steps[i - 10]?.mode === 'idle')
    for (const s of idle) expect(s.reading?.airflowMps).toBeLessThan(0.15)
    for (const s of steps) expect(s.reading?.boothDpPa).toBeGreaterThan(0)
  })

  it('compresses the cycle with speed while timestamps stay wall-clock time', () => {
    const m = model({ seed: 2, speed: 30, initialPhase: 'idle', dropouts: false })
    const steps = oneCycle(m, 1000, 15 * 60)
    expect(steps.length).toBeLessThan(10 * 60)
    for (const s of steps) expect(Date.parse(s.reading?.ts ?? '') - s.nowMs).toBe(m.skewMs)
  })

  it('loads the filters up over simulated days', () => {
    const m = model({ seed: 6, speed: 2000, dropouts: false })
    const before = m.state()
    run(m, Math.ceil((3 * 86_400) / 2000)) // three simulated days
    const after = m.state()
    expect(after.exhaustFilterLoadPa - before.exhaustFilterLoadPa).toBeGreaterThan(10)
    expect(after.intakeFilterLoadPa - before.intakeFilterLoadPa).toBeGreaterThan(5)
  })
})

describe('humidity', () => {
  it('adds the humidityDriftPct trend to the intake RH (percentage points per simulated hour)', () => {
    const base = model({ seed: 9, speed: 30, humidityDriftPct: 0 })
    const drift = model({ seed: 9, speed: 30, humidityDriftPct: 5 })
    run(base, 240)
    run(drift, 240) // 4 minutes at speed 30 = 2 simulated hours
    const b = base.state()
    const d = drift.state()
    expect(d.intakeRhPct - b.intakeRhPct).toBeCloseTo(10, 6)
    // Same cycle and air temperature in both; the extra vapour shows in the booth RH scaled by es(ambient)/es(air).
    expect(d.airTempC).toBe(b.airTempC)
    const expected = (10 * saturationVapourPressureHpa(b.ambientTempC)) / saturationVapourPressureHpa(b.airTempC)
    expect(d.rhPct - b.rhPct).toBeCloseTo(expected, 6)
  })

  it('brings the intake RH back after a humid spell, and lets the walk spread be set', () => {
    const episodes = { peakPct: 10, holdHours: 1, restHours: 20 }
    const base = model({ seed: 9, speed: 30, humidityDriftPct: 0, humidityWalkSdPct: 0 })
    const spell = model({ seed: 9, speed: 30, humidityDriftPct: 4, humidityDriftEpisodes: episodes, humidityWalkSdPct: 0 })
    run(base, 420)
    run(spell, 420) // 7 minutes at speed 30 = 3.5 simulated hours: 2.5 h up, 1 h at the peak
    expect(spell.state().intakeRhPct - base.state().intakeRhPct).toBeCloseTo(10, 6)
    run(base, 300, 1000, START + 420_000)
    run(spell, 300, 1000, START + 420_000) // 2.5 simulated hours more: back down
    expect(spell.state().intakeRhPct - base.state().intakeRhPct).toBeCloseTo(0, 6)
  })

  it('keeps RH within 0–100 % for any seed, speed, drift and forced air temperature', () => {
    fc.assert(
      fc.property(
        fc.integer(),
        fc.constantFrom('downdraft-1', 'prep-deck'),
        fc.double({ min: 1, max: 2000, noNaN: true }),
        fc.double({ min: -500, max: 500, noNaN: true }),
        fc.option(fc.double({ min: -60, max: 200, noNaN: true }), { nil: undefined }),
        (seed, booth, speed, humidityDriftPct, forcedAir) => {
          const m = model({ seed, booth, speed, humidityDriftPct })
          if (forcedAir !== undefined) m.setOverride({ airTempC: forcedAir })
          for (const s of run(m, 300)) {
            if (s.reading?.rhPct === undefined) continue
            expect(s.reading.rhPct).toBeGreaterThanOrEqual(0)
            expect(s.reading.rhPct).toBeLessThanOrEqual(100)
          }
          const rh = m.state().rhPct
          expect(rh >= 0 && rh <= 100).toBe(true)
        },
      ),
      { numRuns: 25 },
    )
  })
})

describe('clock skew and sequence', () => {
  it('draws a per-booth skew within ±5 s and stamps every reading with it', () => {
    fc.assert(
      fc.property(fc.oneof(fc.integer(), fc.string()), fc.constantFrom('downdraft-1', 'downdraft-2', 'prep-deck', 'sim-booth-7'), (seed, booth) => {
        const m = model({ seed, booth })
        expect(Math.abs(m.skewMs)).toBeLessThanOrEqual(5000)
        let lastTs = -Infinity
        for (const s of run(m, 50, 250)) {
          const ts = Date.parse(s.reading?.ts ?? '')
          if (s.reading === null) continue
          expect(ts - s.nowMs).toBe(m.skewMs)
          expect(ts).toBeGreaterThan(lastTs)
          lastTs = ts
        }
      }),
      { numRuns: 50 },
    )
  })

  it('clamps an explicit skew to ±60 s', () => {
    expect(model({ clockSkewMs: 3_600_000 }).skewMs).toBe(60_000)
    expect(model({ clockSkewMs: -90_000 }).skewMs).toBe(-60_000)
    expect(model({ clockSkewMs: 1234 }).skewMs).toBe(1234)
  })

  it('numbers messages consecutively and keeps timestamps increasing even for repeated times', () => {
    const m = model({ dropouts: false, startSeq: 100 })
    const a = m.next(START + 1000)
    const b = m.next(START + 1000)
    expect(a.reading?.seq).toBe(100)
    expect(b.reading?.seq).toBe(101)
    expect(Date.parse(b.reading?.ts ?? '')).toBeGreaterThan(Date.parse(a.reading?.ts ?? ''))
  })
})

describe('dropouts', () => {
  it('occasionally drops a channel or skips messages, and never without dropouts', () => {
    const withDrops = run(model({ seed: 12, channelDropoutsPerHour: 60, gapsPerHour: 20 }), 3600)
    const gaps = withDrops.filter((s) => s.gap)
    // A downdraft reading carries ts, seq and 8 channels; fewer means a channel dropped out.
    const missing = withDrops.filter((s) => s.reading !== null && Object.keys(s.reading).length < 10)
    expect(gaps.length).toBeGreaterThan(20)
    expect(gaps.length).toBeLessThan(600)
    expect(missing.length).toBeGreaterThan(0)
    for (const s of gaps) expect(s.payload).toBeNull()

    const none = run(model({ seed: 12, dropouts: false }), 3600)
    expect(none.some((s) => s.gap)).toBe(false)
    for (const s of none) expect(Object.keys(s.reading ?? {})).toHaveLength(10)
  })
})

describe('overrides', () => {
  it('forces air temperature, RH and airflow exactly, and releases them with null', () => {
    const m = model({ seed: 3, speed: 10 })
    m.setOverride({ airTempC: 35, rhPct: 80, airflowMps: 0.3 })
    const forced = run(m, 120)
    for (const s of forced) {
      expect(s.reading?.airTempC).toBe(35)
      expect(s.reading?.rhPct).toBe(80)
      expect(s.reading?.airflowMps).toBe(0.3)
    }
    // The panel follows the forced air temperature.
    expect(m.state().panelTempC).toBeGreaterThan(30)
    m.setOverride({ rhPct: null })
    const released = run(m, 20, 1000, START + 120_000)
    expect(released.every((s) => s.reading?.airTempC === 35)).toBe(true)
    expect(released.some((s) => s.reading?.rhPct !== 80)).toBe(true)
    m.clearOverride()
    expect(m.state().override).toEqual({})
  })

  it('clamps forced values to the wire ranges', () => {
    const m = model({ dropouts: false })
    m.setOverride({ airTempC: 400, rhPct: 140, airflowMps: -1 })
    const r = m.next(START + 1000).reading
    expect(r?.airTempC).toBe(150)
    expect(r?.rhPct).toBe(100)
    expect(r?.airflowMps).toBe(0)
  })

  it('forces and holds a mode, then resumes the cycle', () => {
    const m = model({ seed: 5, speed: 10, initialPhase: 'idle', dropouts: false })
    m.next(START + 1000)
    m.setOverride({ mode: 'bake' })
    const first = m.next(START + 2000)
    expect(first.modeChanged).toBe('bake')
    const held = run(m, 1800, 1000, START + 2000) // 5 simulated hours
    expect(held.every((s) => s.mode === 'bake' && s.reading?.heaterOn === true)).toBe(true)
    expect(held.some((s) => s.modeChanged !== undefined)).toBe(false)
    m.setOverride({ mode: null })
    const after = run(m, 600, 1000, START + 1_802_000)
    expect(modeSequence('bake', after).slice(0, 3)).toEqual(['bake', 'cool', 'idle'])
  })

  it('rejects non-finite overrides', () => {
    expect(() => model().setOverride({ airTempC: Number.NaN })).toThrow(RangeError)
  })
})
