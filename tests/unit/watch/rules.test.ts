import { describe, expect, it } from 'vitest'
import { defaultWatchRules, WATCH_KINDS, WatchRuleListSchema, WatchRuleSchema } from '#shared/watch'

function issues(input: unknown): [string, string][] {
  const r = WatchRuleSchema.safeParse(input)
  return r.success ? [] : r.error.issues.map((i) => [i.path.join('.'), i.message])
}

describe('shop defaults', () => {
  const rules = defaultWatchRules()

  it('cover every kind, with unique ids, and each parses again to itself', () => {
    expect(new Set(rules.map((r) => r.kind))).toEqual(new Set(WATCH_KINDS))
    expect(new Set(rules.map((r) => r.id)).size).toBe(rules.length)
    for (const r of rules) expect(WatchRuleSchema.parse(r)).toEqual(r)
    expect(WatchRuleListSchema.safeParse(rules).success).toBe(true)
  })

  it('carry the documented values', () => {
    const byId = Object.fromEntries(rules.map((r) => [r.id, r]))
    expect(byId['rh-band']).toMatchObject({ params: { lowPct: 40, highPct: 70 }, hysteresis: 2, activeWhen: ['spray', 'flash'] })
    expect(byId['air-temp-band']).toMatchObject({ params: { lowC: 15, highC: 35 } })
    expect(byId['dew-point-margin']).toMatchObject({ params: { minC: 3 } })
    expect(byId['airflow-min']).toMatchObject({ params: { minMps: 0.3 } })
    expect(byId['booth-pressure']).toMatchObject({ params: { lowPa: 2, highPa: 15 } })
    expect(byId['intake-filter']).toMatchObject({ channel: 'intakeFilterDpPa', params: { maxPa: 250 } })
    expect(byId['exhaust-filter']).toMatchObject({ channel: 'exhaustFilterDpPa', params: { maxPa: 150 } })
    expect(byId['sensor-silence']).toMatchObject({ channel: 'any', params: { silentAfterMs: 60_000 } })
    expect(byId['bake-temp']).toMatchObject({ params: { targetC: 60, withinMs: 900_000 } })
    expect(byId['rh-drift']).toMatchObject({ params: { k: 0.5, h: 5, subgroupMs: 60_000, capSigma: 10 } })
  })

  it('give a prep deck its own airflow and pressure figures, and the rest as for a downdraft booth', () => {
    const prep = defaultWatchRules('prep_deck')
    const byId = Object.fromEntries(prep.map((r) => [r.id, r]))
    expect(byId['airflow-min']).toMatchObject({ params: { minMps: 0.25 }, hysteresis: 0.03 })
    expect(byId['booth-pressure']).toMatchObject({ params: { lowPa: 0.5, highPa: 10 }, hysteresis: 0.5 })
    const differ = prep.filter((r, i) => JSON.stringify(r) !== JSON.stringify(rules[i])).map((r) => r.id)
    expect(differ).toEqual(['airflow-min', 'booth-pressure'])
    expect(defaultWatchRules('crossdraft')).toEqual(rules)
  })
})

describe('WatchRuleSchema messages', () => {
  it('rejects an unknown kind, naming the choices', () => {
    expect(issues({ id: 'a', kind: 'rh_max' })).toEqual([['kind', expect.stringContaining('kind must be one of: rh_band')]])
  })

  it('checks the band order and that the hysteresis fits in it', () => {
    expect(issues({ id: 'a', kind: 'rh_band', params: { lowPct: 70, highPct: 40 } })).toEqual([
      ['params', 'The low limit must be below the high limit (%RH)'],
    ])
    expect(issues({ id: 'a', kind: 'air_temp_band', params: { lowC: 18, highC: 20 }, hysteresis: 1 })).toEqual([
      ['hysteresis', 'hysteresis must be less than half the band (1 °C)'],
    ])
  })

  it('checks units and ranges field by field', () => {
    expect(issues({ id: 'a', kind: 'rh_band', params: { highPct: 120 } })).toEqual([['params.highPct', 'params.highPct must be at most 100 %RH']])
    expect(issues({ id: 'a', kind: 'rh_band', openAfterMs: 1.5 })).toEqual([['openAfterMs', 'openAfterMs must be a whole number of milliseconds']])
    expect(issues({ id: 'a', kind: 'airflow_min_in_spray', params: { minMps: '0.3' } })).toEqual([['params.minMps', 'params.minMps must be a number (m/s)']])
    expect(issues({ id: ' ', kind: 'rh_band' })).toEqual([['id', 'Give the rule an id']])
    expect(issues({ id: 'a', kind: 'rh_band', activeWhen: ['paint'] })[0]).toEqual(['activeWhen.0', expect.stringContaining('Choose booth modes from')])
  })

  it('requires a filter bank, and refuses unused timing on timer kinds', () => {
    expect(issues({ id: 'a', kind: 'filter_dp_max' })).toEqual([['channel', 'filter_dp_max watches intakeFilterDpPa or exhaustFilterDpPa']])
    expect(issues({ id: 'a', kind: 'sensor_silence', openAfterMs: 5000 })).toEqual([
      ['openAfterMs', 'openAfterMs is not used by sensor_silence (use params.silentAfterMs); leave it at 0'],
    ])
  })

  it('checks the CUSUM parameters', () => {
    expect(issues({ id: 'a', kind: 'rh_cusum', params: { sigmaPct: 0 } })).toEqual([['params.sigmaPct', 'params.sigmaPct must be at least 0.01 %RH']])
    expect(issues({ id: 'a', kind: 'rh_cusum', params: { capSigma: 4 } })).toEqual([['params.capSigma', 'params.capSigma must be above params.h (or null)']])
    expect(issues({ id: 'a', kind: 'rh_cusum', params: { clearFraction: 1 } })[0]?.[0]).toBe('params.clearFraction')
    expect(issues({ id: 'a', kind: 'rh_cusum', params: { capSigma: null } })).toEqual([])
  })

  it('a rule list refuses a repeated id', () => {
    const r = WatchRuleListSchema.safeParse([{ id: 'x', kind: 'rh_band' }, { id: 'x', kind: 'sensor_silence' }])
    expect(r.success).toBe(false)
    expect(r.error?.issues.map((i) => [i.path.join('.'), i.message])).toEqual([['1.id', 'Rule id "x" is used twice']])
  })
})
