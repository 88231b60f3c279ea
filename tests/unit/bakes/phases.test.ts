import { describe, expect, it } from 'vitest'
import { detectPhases, minutesAtOrAbove, phaseAt } from '#shared/bake/phases'
import { MIN, S, T0, minutesOf, series, simulatedBake } from './helpers'

const spans = (r: ReturnType<typeof detectPhases>) => r.phases.map((p) => [p.phase, minutesOf(p.startMs), minutesOf(p.endMs)])

describe('phases of hand-built bake cycles', () => {
  // One reading a minute. 0–4 min purge at 22 °C (heater off); heater on at 5 min, panel rises
  // 22 → 60 °C by 25 min (1.9 K/min); holds 60 °C to 55 min; heater off, falls 1.5 K/min to 70 min.
  const panel = (sec: number) => {
    const m = sec / 60
    if (m < 5) return 22
    if (m <= 25) return 22 + (38 * (m - 5)) / 20
    if (m <= 55) return 60
    return 60 - 1.5 * (m - 55)
  }
  const heater = (sec: number) => sec >= 5 * 60 && sec < 55 * 60

  it('finds purge, ramp, hold and cool of a normal cycle', () => {
    const r = detectPhases(series(70 * 60, 60, panel, heater), T0, T0 + 70 * MIN, { targetC: 60 })
    // Hold band from 58 °C (60 − 2 K): first reading ≥ 58 is at 24 min (22 + 1.9·19 = 58.1).
    // Last reading in the band is 56 min (58.5); the next reading (57 min, 57) ends the hold.
    expect(spans(r)).toEqual([
      ['purge', 0, 5],
      ['ramp', 5, 24],
      ['hold', 24, 57],
      ['cool', 57, 70],
    ])
    expect(r.reachedTarget).toBe(true)
    expect(r.holdMinutes).toBe(33)
    // Readings at ≥ 60 °C: 25…55 min, each held one minute → 31 min.
    expect(r.minutesAtOrAboveTarget).toBe(31)
    expect(r.reasons).toEqual([])
    expect(r.heaterOnAtMs).toBe(T0 + 5 * MIN)
    expect(phaseAt(r, T0 + 30 * MIN)).toBe('hold')
    expect(phaseAt(r, T0 + 2 * MIN)).toBe('purge')
  })

  it('without heater data, the ramp starts where the panel has risen 2 K', () => {
    const r = detectPhases(series(70 * 60, 60, panel), T0, T0 + 70 * MIN, { targetC: 60 })
    // 22 + 1.9·(m − 5) ≥ 24 first at m = 7 (25.8 °C; the 5-reading median there is 25.8).
    expect(spans(r)[0]).toEqual(['purge', 0, 7])
    expect(spans(r)[1]).toEqual(['ramp', 7, 24])
  })

  it('infers the hold temperature from the peak when no target is given, and says so', () => {
    const r = detectPhases(series(70 * 60, 60, panel, heater), T0, T0 + 70 * MIN)
    expect(r.targetC).toBe(60)
    expect(r.targetInferred).toBe(true)
    expect(r.reasons).toContain('target-inferred')
    expect(spans(r).map((s) => s[0])).toEqual(['purge', 'ramp', 'hold', 'cool'])
  })

  it('a bake that never reaches temperature has no hold: ramp to the heater going off, then cool', () => {
    // Same heater timing, but the panel creeps to 48 °C only.
    const weak = (sec: number) => {
      const m = sec / 60
      if (m < 5) return 22
      if (m <= 55) return 22 + 26 * (1 - Math.exp(-(m - 5) / 12))
      return 22 + 26 * (1 - Math.exp(-50 / 12)) - 1.2 * (m - 55)
    }
    const r = detectPhases(series(70 * 60, 60, weak, heater), T0, T0 + 70 * MIN, { targetC: 60 })
    expect(r.reachedTarget).toBe(false)
    expect(r.reasons).toContain('target-not-reached')
    expect(spans(r)).toEqual([
      ['purge', 0, 5],
      ['ramp', 5, 55],
      ['cool', 55, 70],
    ])
    expect(r.holdMinutes).toBe(0)
    expect(r.minutesAtOrAboveTarget).toBe(0)
    expect(r.peakC!).toBeLessThan(48.5)
  })

  it('a power cut mid-hold: the hold ends where the panel falls out of the band, and the readings stop', () => {
    // One reading a minute; ramp as above; 60 °C from 25 to 35 min; the heater trips at 35 min and the
    // panel falls 2.5 K/min (35 → 60 °C, 36 → 57.5 … 39 → 50 °C); after 39 min no reading arrives at all.
    // The bake is ended by hand at 60 min.
    const cut = (sec: number) => {
      const m = sec / 60
      if (m > 39) return null
      if (m < 5) return 22
      if (m <= 25) return 22 + (38 * (m - 5)) / 20
      if (m <= 35) return 60
      return 60 - 2.5 * (m - 35)
    }
    const r = detectPhases(series(60 * 60, 60, cut, (sec) => sec >= 300 && sec < 35 * 60), T0, T0 + 60 * MIN, { targetC: 60 })
    // 5-reading median at 35 min: (60, 60, 60, 57.5, 55) → 60, in the band; at 36 min: (60, 60, 57.5, 55, 52.5)
    // → 57.5, out. So the hold is 24 → 36 min (the reading at 36 min is the first seen out of the band).
    expect(spans(r)).toEqual([
      ['purge', 0, 5],
      ['ramp', 5, 24],
      ['hold', 24, 36],
      ['cool', 36, 60],
    ])
    expect(r.readingsStopped).toBe(true)
    expect(r.lastReadingAtMs).toBe(T0 + 39 * MIN)
    // The last reading is held 2 min (to 41 min); from there to the end nothing is known.
    expect(r.gaps).toEqual([{ startMs: T0 + 41 * MIN, endMs: T0 + 60 * MIN }])
    expect(r.reasons).toEqual(expect.arrayContaining(['data-gap', 'readings-stopped']))
    // ≥ 60 °C: readings 25…35 min, one minute each → 11 min.
    expect(r.minutesAtOrAboveTarget).toBe(11)
  })

  it('a dip inside the hold is listed, the hold is not split, and one noisy reading is no dip', () => {
    const dip = (sec: number) => {
      const m = sec / 60
      if (m < 20) return 20 + 2 * m // 20 → 60 °C at 20 min
      if (m >= 30 && m < 34) return 55 // door opened: 4 min at 55 °C
      if (sec === 40 * 60) return 40 // one bad reading
      return 60
    }
    const r = detectPhases(series(60 * 60, 10, dip), T0, T0 + 60 * MIN, { targetC: 60 })
    expect(spans(r).map((s) => s[0])).toEqual(['purge', 'ramp', 'hold'])
    expect(r.dips).toHaveLength(1)
    expect(minutesOf(r.dips[0]!.startMs)).toBeCloseTo(30, 5)
    // The median over 5 readings lags the edges by two readings (20 s) each way.
    expect(minutesOf(r.dips[0]!.endMs)).toBeCloseTo(34, 0)
    expect(r.dips[0]!.minC).toBe(55)
    expect(r.reasons).toContain('dip-during-hold')
  })

  it('sensor dropouts shorter than the hold change nothing; a long one is a gap', () => {
    const steady = (sec: number) => (sec < 1200 ? 20 + sec / 30 : 60)
    // Every 10 s; the panel channel missing for 50 s out of every 3 minutes, and 5 minutes from 40 min.
    const holes = (sec: number) => (sec % 180 >= 120 && sec % 180 < 170) || (sec >= 40 * 60 && sec < 45 * 60)
    const full = detectPhases(series(60 * 60, 10, steady), T0, T0 + 60 * MIN, { targetC: 60 })
    const holed = detectPhases(series(60 * 60, 10, (s) => (holes(s) ? null : steady(s))), T0, T0 + 60 * MIN, { targetC: 60 })
    expect(holed.phases.map((p) => p.phase)).toEqual(full.phases.map((p) => p.phase))
    expect(Math.abs(holed.reachedAtMs! - full.reachedAtMs!)).toBeLessThanOrEqual(60 * S)
    // Only the 5-minute hole exceeds the 2-minute hold: a gap from 39:50 + 2 min to 45:00.
    expect(holed.gaps).toEqual([{ startMs: T0 + (39 * 60 + 50 + 120) * S, endMs: T0 + 45 * MIN }])
    expect(holed.readingsStopped).toBe(false)
    // 60 °C from 20 min to 60 min = 40 min, less the uncovered 3 min 10 s of the long hole, less 50 s at the
    // start: 20:00…20:40 fall in a short hole, so the 19:50 reading (59.7 °C) holds until 20:50.
    // 40 − 190/60 − 50/60 = 36 min.
    expect(holed.minutesAtOrAboveTarget).toBeCloseTo(36, 5)
  })

  it('uses the air temperature when no panel sensor reads, and says so', () => {
    const r = detectPhases(series(40 * 60, 30, () => null, () => null, (s) => (s < 600 ? 20 + s / 15 : 60)), T0, T0 + 40 * MIN, { targetC: 60 })
    expect(r.channel).toBe('airTempC')
    expect(r.reasons).toContain('air-temperature-used')
    expect(r.reachedTarget).toBe(true)
  })

  it('no reading at all: valid, no phases, one gap', () => {
    const r = detectPhases([], T0, T0 + 30 * MIN, { targetC: 60 })
    expect(r.valid).toBe(true)
    expect(r.phases).toEqual([])
    expect(r.reasons).toEqual(['no-data'])
  })

  it('invalid input never throws', () => {
    expect(detectPhases(null as never, T0, T0 + MIN).valid).toBe(false)
    expect(detectPhases([], T0 + MIN, T0).valid).toBe(false)
    expect(detectPhases([], Number.NaN, T0).valid).toBe(false)
    expect(detectPhases([], T0, T0 + MIN, { targetC: Number.NaN }).valid).toBe(false)
    expect(Number.isNaN(minutesAtOrAbove([], T0, T0 - 1, 60))).toBe(true)
  })
})

describe('phases of simulated bake cycles (simulator/model.ts)', () => {
  it.each([1, 7, 42])('seed %i: ramp from the bake start, a ~30 min hold, then cool, matching the model', (seed) => {
    const b = simulatedBake({ seed, dropouts: false })
    const r = detectPhases(b.samples, b.startMs, b.endMs, { targetC: 60 })
    expect(r.phases.map((p) => p.phase)).toEqual(['ramp', 'hold', 'cool'])
    const [ramp, hold, cool] = r.phases
    // The model turns the heater on as it reports bake: no purge.
    expect(ramp!.startMs).toBe(b.startMs)
    // The model holds once the panel is within 1.5 K of 60 °C; our band starts at 58 °C, so a little earlier.
    expect((b.holdAtMs - hold!.startMs) / MIN).toBeGreaterThanOrEqual(0)
    expect((b.holdAtMs - hold!.startMs) / MIN).toBeLessThan(2)
    // The panel stays above 58 °C for a minute or two after the model starts cooling (it lags the air).
    expect((hold!.endMs - b.coolAtMs) / MIN).toBeGreaterThan(0)
    expect((hold!.endMs - b.coolAtMs) / MIN).toBeLessThan(4)
    expect(r.holdMinutes).toBeGreaterThan(30)
    expect(r.holdMinutes).toBeLessThan(34)
    expect(cool!.endMs).toBe(b.endMs)
    expect(r.reasons).toEqual([])
  })

  it('with sensor dropouts and message gaps the phases stay within a minute of the clean run', () => {
    const clean = simulatedBake({ seed: 3, dropouts: false })
    const noisy = simulatedBake({ seed: 3, dropouts: true, channelDropoutsPerHour: 120, gapsPerHour: 20 })
    // Dropouts come from their own random stream: the physics (and so the mode times) are the same.
    expect(noisy.startMs).toBe(clean.startMs)
    const a = detectPhases(clean.samples, clean.startMs, clean.endMs, { targetC: 60 })
    const b = detectPhases(noisy.samples, noisy.startMs, noisy.endMs, { targetC: 60 })
    expect(noisy.samples.length).toBeLessThan(clean.samples.length)
    expect(b.phases.map((p) => p.phase)).toEqual(a.phases.map((p) => p.phase))
    a.phases.forEach((p, i) => {
      expect(Math.abs(b.phases[i]!.startMs - p.startMs)).toBeLessThanOrEqual(MIN)
      expect(Math.abs(b.phases[i]!.endMs - p.endMs)).toBeLessThanOrEqual(MIN)
    })
    // Gaps of a few seconds are inside the 2-minute hold: no data gap.
    expect(b.gaps).toEqual([])
  })
})
