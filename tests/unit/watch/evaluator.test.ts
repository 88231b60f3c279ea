import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  BOOTH_MODES,
  createBoothEvaluator,
  defaultWatchRules,
  WatchRuleSchema,
  type BoothEvaluator,
  type WatchEvent,
  type WatchReading,
} from '#shared/watch'
import { MIN, S, T0 } from './helpers'

const brief = (e: WatchEvent) => `${e.ruleId}:${e.type}@${(e.at - T0) / S}`

function run(ev: BoothEvaluator, readings: readonly WatchReading[]): WatchEvent[] {
  return readings.flatMap((r) => [...ev.onReading(r)])
}

/** 1 Hz readings from fromSec to toSec (exclusive) with the same fields. */
function hold(fromSec: number, toSec: number, fields: Omit<WatchReading, 't'>): WatchReading[] {
  return Array.from({ length: toSec - fromSec }, (_, i) => ({ t: T0 + (fromSec + i) * S, ...fields }))
}

const rule = (input: unknown) => WatchRuleSchema.parse(input)
const OK = { airTempC: 22, rhPct: 55, airflowMps: 0.4, boothDpPa: 6, dewPointMarginC: 8 }

describe('mode-conditional rules', () => {
  const airflow = rule({ id: 'af', kind: 'airflow_min_in_spray' }) // 0.3 m/s, 15 s / 15 s, hysteresis 0.03

  it('low airflow opens only while spraying, after 15 s; leaving spray ends the alert', () => {
    const ev = createBoothEvaluator([airflow])
    const events = run(ev, [
      ...hold(0, 60, { ...OK, mode: 'flash', airflowMps: 0.1 }), // flash: not watched
      ...hold(60, 100, { ...OK, mode: 'spray', airflowMps: 0.1 }), // opens at 75
      ...hold(100, 110, { ...OK, mode: 'flash', airflowMps: 0.1 }), // ends at 100
    ])
    expect(events.map(brief)).toEqual(['af:open@75', 'af:clear@100'])
    expect(events[0]).toMatchObject({ kind: 'airflow_min_in_spray', value: 0.1, limit: 0.3, peak: 0.1 })
    expect(events[0]!.message).toBe('Low airflow while spraying: Airflow 0.10 m/s, below the 0.30 m/s limit for 15 s')
    expect(events[1]).toMatchObject({ value: null, peak: 0.1 })
    expect(events[1]!.message).toContain('not watched in flash mode')
  })

  it('a pending excursion is dropped when spraying stops: the 15 s start again', () => {
    const ev = createBoothEvaluator([airflow])
    const events = run(ev, [
      ...hold(0, 10, { mode: 'spray', airflowMps: 0.1 }),
      ...hold(10, 12, { mode: 'flash', airflowMps: 0.1 }),
      ...hold(12, 40, { mode: 'spray', airflowMps: 0.1 }),
    ])
    expect(events.map(brief)).toEqual(['af:open@27'])
  })

  it('an unknown mode keeps mode-bound rules quiet; readings without a mode keep the last one', () => {
    const ev = createBoothEvaluator([airflow])
    expect(run(ev, hold(0, 60, { airflowMps: 0.1 }))).toEqual([])
    const events = run(ev, [{ t: T0 + 60 * S, mode: 'spray', airflowMps: 0.1 }, ...hold(61, 80, { airflowMps: 0.1 })])
    expect(events.map(brief)).toEqual(['af:open@75'])
  })

  it('bake: deadline from bake start, checked on ticks when readings stop; leaving bake clears', () => {
    const bake = rule({ id: 'bk', kind: 'bake_not_reaching_temp', params: { targetC: 60, withinMs: 10 * MIN } })
    const ev = createBoothEvaluator([bake])
    expect(run(ev, [...hold(0, 30, { mode: 'spray', airTempC: 22 }), ...hold(30, 300, { mode: 'bake', airTempC: 45 })])).toEqual([])
    expect(ev.onTick(T0 + 629 * S)).toEqual([])
    const open = ev.onTick(T0 + 630 * S)
    expect(open.map(brief)).toEqual(['bk:open@630'])
    expect(open[0]).toMatchObject({ value: 45, limit: 60, peak: 45 })
    expect(ev.onTick(T0 + 700 * S)).toEqual([])
    expect(run(ev, [{ t: T0 + 800 * S, mode: 'cool', airTempC: 50 }]).map(brief)).toEqual(['bk:clear@800'])
  })

  it('band rules follow their activeWhen: RH in bake is not watched by default', () => {
    const rh = rule({ id: 'rh', kind: 'rh_band' })
    const ev = createBoothEvaluator([rh])
    expect(run(ev, hold(0, 600, { mode: 'bake', rhPct: 8 }))).toEqual([])
    expect(run(ev, hold(600, 800, { mode: 'spray', rhPct: 8 })).map(brief)).toEqual(['rh:open@720'])
  })
})

describe('silence and ticks', () => {
  it('opens on a tick after 60 s without readings and clears on the next reading', () => {
    const ev = createBoothEvaluator([rule({ id: 'sil', kind: 'sensor_silence' })], { startMs: T0 })
    run(ev, hold(0, 10, OK))
    expect(ev.onTick(T0 + 68 * S)).toEqual([])
    const open = ev.onTick(T0 + 69 * S)
    expect(open.map(brief)).toEqual(['sil:open@69'])
    expect(open[0]!.message).toBe('Sensor silent: No sensor data for 1 min')
    const back = run(ev, [{ t: T0 + 100 * S, ...OK }])
    expect(back.map(brief)).toEqual(['sil:clear@100'])
    expect(back[0]).toMatchObject({ value: 91_000 })
  })

  it('a per-channel silence opens while other channels keep reporting', () => {
    const ev = createBoothEvaluator([rule({ id: 'panel', kind: 'sensor_silence', channel: 'panelTempC' })], { startMs: T0 })
    expect(run(ev, hold(0, 120, { airTempC: 20, panelTempC: null })).map(brief)).toEqual(['panel:open@60'])
  })

  it('a booth that never reports raises silence from startMs', () => {
    const ev = createBoothEvaluator([rule({ id: 'sil', kind: 'sensor_silence' })], { startMs: T0 })
    expect(ev.onTick(T0 + MIN).map(brief)).toEqual(['sil:open@60'])
  })
})

describe('input handling', () => {
  const rh = rule({ id: 'rh', kind: 'rh_band', openAfterMs: 0, clearAfterMs: 0 })

  it('late, non-finite-time and no-data readings do nothing', () => {
    const ev = createBoothEvaluator([rh], { initialMode: 'spray' })
    expect(run(ev, [{ t: T0 + 10 * S, rhPct: 50 }])).toEqual([])
    expect(ev.onReading({ t: T0 + 5 * S, rhPct: 90 })).toEqual([]) // late
    expect(ev.onReading({ t: Number.NaN, rhPct: 90 })).toEqual([])
    expect(ev.onReading({ t: T0 + 11 * S, rhPct: null })).toEqual([])
    expect(ev.onReading({ t: T0 + 12 * S, rhPct: Number.NaN })).toEqual([])
    expect(ev.onReading({ t: T0 + 13 * S })).toEqual([])
    expect(ev.onTick(Number.NaN)).toEqual([])
    expect(ev.onReading({ t: T0 + 14 * S, rhPct: 90 }).map(brief)).toEqual(['rh:open@14'])
  })

  it('a bad mode string is ignored, disabled rules and repeated ids are skipped', () => {
    const ev = createBoothEvaluator([rh, rh, rule({ id: 'off', kind: 'rh_band', enabled: false, openAfterMs: 0 })], {
      initialMode: 'spray',
    })
    // @ts-expect-error a wrong mode from the wire
    const events = [...ev.onReading({ t: T0, rhPct: 90, mode: 'paint' })]
    expect(events.map(brief)).toEqual(['rh:open@0'])
    expect(Object.keys(ev.snapshot().rules)).toEqual(['rh'])
  })

  it('restore survives garbage and restarts fresh', () => {
    const ev = createBoothEvaluator(defaultWatchRules())
    for (const junk of [null, 42, 'x', {}, { version: 2 }, { version: 1, rules: { 'rh-band': { engine: 'cusum' } } },
      { version: 1, lastT: 'x', mode: 'nope', rules: { 'rh-band': { engine: 'threshold', threshold: { openedAt: 5 } } } }]) {
      expect(() => ev.restore(junk)).not.toThrow()
      expect(ev.snapshot()).toEqual(createBoothEvaluator(defaultWatchRules()).snapshot())
    }
  })
})

describe('RH drift (CUSUM) in the evaluator', () => {
  it('averages to 1-minute means and opens on a sustained +2σ shift, not on 1 Hz noise', () => {
    const drift = rule({ id: 'drift', kind: 'rh_cusum', params: { targetPct: 55, sigmaPct: 1 } })
    const ev = createBoothEvaluator([drift], { initialMode: 'spray' })
    // ±3 %RH alternating noise at 1 Hz (3σ of the means per reading!) averages to 55 exactly: no alert for an hour.
    expect(run(ev, hold(0, 3600, { rhPct: 55 }).map((r, i) => ({ ...r, rhPct: 55 + (i % 2 ? 3 : -3) })))).toEqual([])
    // Then +2 %RH: each minute adds 2 − 0.5 = 1.5 to S_hi; above 5 after the 4th minute, reported at that minute's end.
    const events = run(ev, hold(3600, 3900, { rhPct: 57 }))
    expect(events.map(brief)).toEqual(['drift:open@3840'])
    expect(events[0]).toMatchObject({ value: 57, limit: 55 })
  })

  it('holds an open drift alert through a bake and idle; clears once the watched modes show the target again', () => {
    const drift = rule({ id: 'drift', kind: 'rh_cusum', params: { targetPct: 55, sigmaPct: 1 } })
    const ev = createBoothEvaluator([drift])
    const opened = run(ev, hold(0, 300, { mode: 'spray', rhPct: 58 }))
    expect(opened.map(brief)).toEqual(['drift:open@180'])
    // Bake heating drives RH to 10 %, then the booth idles: neither is a painting condition, nothing changes.
    expect(run(ev, [...hold(300, 2100, { mode: 'bake', rhPct: 10 }), ...hold(2100, 2400, { mode: 'idle', rhPct: 80 })])).toEqual([])
    // Back to spraying, humidity at its target: S_hi falls by kσ = 0.5 a minute from its capped 10 (capSigma 10).
    const cleared = run(ev, hold(2400, 4200, { mode: 'spray', rhPct: 55 }))
    expect(cleared.map(brief)).toEqual(['drift:clear@3600'])
  })
})

describe('snapshot / restore', () => {
  // Short timings so random sequences produce many events of every kind.
  const rules = [
    rule({ id: 'rh', kind: 'rh_band', openAfterMs: 3000, clearAfterMs: 2000, hysteresis: 1 }),
    rule({ id: 'af', kind: 'airflow_min_in_spray', openAfterMs: 2000, clearAfterMs: 2000 }),
    rule({ id: 'dp', kind: 'booth_pressure_band', openAfterMs: 1000, clearAfterMs: 1000 }),
    rule({ id: 'flt', kind: 'filter_dp_max', channel: 'exhaustFilterDpPa', params: { maxPa: 150 }, openAfterMs: 0, clearAfterMs: 1000 }),
    rule({ id: 'sil', kind: 'sensor_silence', params: { silentAfterMs: 5000 } }),
    rule({ id: 'bk', kind: 'bake_not_reaching_temp', params: { targetC: 60, withinMs: MIN } }),
    rule({ id: 'cu', kind: 'rh_cusum', params: { subgroupMs: 5000, minSubgroupCount: 1, sigmaPct: 2, capSigma: 8 } }),
  ]
  // Segments of steady readings (so excursions last long enough to open and clear), late readings, and ticks.
  const some = <T>(...values: T[]) => fc.constantFrom<T | undefined>(undefined, ...values)
  const segment = fc.record({
    n: fc.integer({ min: 1, max: 40 }),
    dt: fc.integer({ min: 200, max: 3000 }),
    mode: some(...BOOTH_MODES),
    rhPct: some<number | null>(50, 55, 60, 75, 35, null),
    airflowMps: some(0.1, 0.28, 0.32, 0.4),
    boothDpPa: some(1, 6, 20),
    exhaustFilterDpPa: some(120, 145, 170),
    airTempC: some(25, 45, 65),
  })
  const late = fc.record({ late: fc.integer({ min: 1, max: 5000 }), rhPct: fc.constantFrom(40, 90) })
  const tick = fc.record({ tick: fc.integer({ min: 0, max: 90_000 }) })
  const script = fc.array(fc.oneof({ weight: 6, arbitrary: segment }, { weight: 1, arbitrary: late }, { weight: 2, arbitrary: tick }), {
    minLength: 1,
    maxLength: 40,
  })
  type Op = { tick: number } | (Omit<WatchReading, 't'> & { dt: number })
  type Part = typeof script extends fc.Arbitrary<(infer P)[]> ? P : never
  function flatten(parts: readonly Part[]): Op[] {
    return parts.flatMap((p): Op[] => {
      if ('tick' in p) return [p]
      if ('late' in p) return [{ dt: -p.late, rhPct: p.rhPct }, { dt: p.late }] // a late reading, then back in time
      const { n, dt, mode, ...values } = p
      return Array.from({ length: n }, (_, i) => (i === 0 && mode ? { dt, mode, ...values } : { dt, ...values }))
    })
  }

  /** Replays ops from reading time t0; ticks fire `tick` ms after the last reading. */
  function apply(ev: BoothEvaluator, ops: readonly Op[], t0 = T0): { events: WatchEvent[]; t: number } {
    let t = t0
    const events: WatchEvent[] = []
    for (const o of ops) {
      if ('tick' in o) events.push(...ev.onTick(t + o.tick))
      else {
        const { dt, ...fields } = o
        t += dt
        events.push(...ev.onReading({ ...fields, t }))
      }
    }
    return { events, t }
  }

  it('snapshot is plain JSON', () => {
    const ev = createBoothEvaluator(rules, { startMs: T0 })
    run(ev, hold(0, 30, { ...OK, mode: 'spray', rhPct: 90 }))
    const snap = ev.snapshot()
    expect(JSON.parse(JSON.stringify(snap))).toEqual(snap)
  })

  it('restoring a JSON copy of the state mid-sequence gives the same events (and end state) as an uninterrupted run', () => {
    fc.assert(
      fc.property(script, fc.nat(), (parts, cut) => {
        const ops = flatten(parts)
        const k = cut % (ops.length + 1)
        const uninterrupted = createBoothEvaluator(rules, { startMs: T0 })
        const whole = apply(uninterrupted, ops).events
        const first = createBoothEvaluator(rules, { startMs: T0 })
        const before = apply(first, ops.slice(0, k))
        // A different startMs proves the silence state comes from the snapshot, not from the options.
        const second = createBoothEvaluator(rules, { startMs: T0 + 12_345 })
        second.restore(JSON.parse(JSON.stringify(first.snapshot())))
        const after = apply(second, ops.slice(k), before.t)
        expect([...before.events, ...after.events]).toEqual(whole)
        // And both end in the same state, so later events will agree too.
        expect(second.snapshot()).toEqual(uninterrupted.snapshot())
      }),
      { numRuns: 150 },
    )
  })
})
