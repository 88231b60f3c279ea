import { describe, expect, it } from 'vitest'
import { ApplicationWindowSchema, ApplicationWindowWatch } from '../../../server/alerts/application-window'
import { PutWatchesSchema, fromStored, defaultWatches } from '../../../server/alerts/watch-set'

const S = 1000
const t0 = Date.parse('2026-03-10T10:00:00Z')

function feed(w: ApplicationWindowWatch, fromS: number, toS: number, values: { airTempC?: number; rhPct?: number }, mode: 'spray' | 'bake' | null = 'spray') {
  const events = []
  for (let s = fromS; s <= toS; s++) events.push(...w.reading({ t: t0 + s * S, ...values }, mode))
  return events
}

describe('application window watch', () => {
  it('opens after a minute outside the data sheet limits, not before, and clears with hysteresis', () => {
    const w = new ApplicationWindowWatch()
    w.set({ minTempC: 18, maxTempC: 30 }, t0)
    expect(feed(w, 0, 59, { airTempC: 16.5 })).toEqual([])
    const opened = feed(w, 60, 60, { airTempC: 16.4 })
    expect(opened).toHaveLength(1)
    expect(opened[0]).toMatchObject({ type: 'open', ruleId: 'application-window-temp', kind: 'application_window', channel: 'airTempC', value: 16.4, limit: 18 })
    expect(opened[0]!.message).toContain('below the data sheet')
    // Back to 18.2 °C: inside the band but within the 0.5 °C hysteresis → stays open.
    expect(feed(w, 61, 200, { airTempC: 18.2 })).toEqual([])
    // 18.6 °C for 30 s clears it.
    expect(feed(w, 201, 230, { airTempC: 18.6 })).toEqual([])
    const cleared = feed(w, 231, 231, { airTempC: 18.6 })
    expect(cleared).toMatchObject([{ type: 'clear', value: 18.6, peak: 16.4 }])
  })

  it('watches humidity separately, and ignores channels without limits', () => {
    const w = new ApplicationWindowWatch()
    w.set({ maxRhPct: 65 }, t0)
    const events = feed(w, 0, 61, { airTempC: 5, rhPct: 72 })
    expect(events).toMatchObject([{ type: 'open', ruleId: 'application-window-rh', channel: 'rhPct', limit: 65 }])
  })

  it('ends an open alert when the job step ends (null) or the booth goes to bake', () => {
    const w = new ApplicationWindowWatch()
    w.set({ minTempC: 18 }, t0)
    feed(w, 0, 61, { airTempC: 12 })
    expect(w.set(null, t0 + 70 * S)).toMatchObject([{ type: 'clear', value: null }])
    expect(w.current).toBeNull()
    expect(feed(w, 71, 200, { airTempC: 12 })).toEqual([])

    w.set({ minTempC: 18 }, t0 + 300 * S)
    feed(w, 300, 361, { airTempC: 12 })
    expect(feed(w, 362, 362, { airTempC: 70 }, 'bake')).toMatchObject([{ type: 'clear', value: null }])
  })

  it('keeps pending time across a snapshot and restore', () => {
    const a = new ApplicationWindowWatch()
    a.set({ minTempC: 18 }, t0)
    feed(a, 0, 40, { airTempC: 12 })
    const b = new ApplicationWindowWatch()
    b.restore(JSON.parse(JSON.stringify(a.snapshot())))
    expect(b.current).toEqual({ minTempC: 18 })
    expect(feed(b, 41, 59, { airTempC: 12 })).toEqual([])
    expect(feed(b, 60, 60, { airTempC: 12 })).toHaveLength(1)
    // Garbage restores to "no window" rather than throwing.
    const c = new ApplicationWindowWatch()
    c.restore({ limits: { minTempC: 'cold' }, temp: 5 })
    expect(c.current).toBeNull()
  })

  it('refuses limits that cannot be met', () => {
    expect(ApplicationWindowSchema.safeParse({ minTempC: 30, maxTempC: 20 }).success).toBe(false)
    expect(ApplicationWindowSchema.safeParse({ minRhPct: -5 }).success).toBe(false)
    expect(ApplicationWindowSchema.safeParse({ minTempC: 15, maxRhPct: 75 }).success).toBe(true)
  })
})

describe('watch sets', () => {
  it('fills a minimal rule with the shop defaults and keeps its extra recipients', () => {
    const r = PutWatchesSchema.parse({ watches: [{ id: 'rh', kind: 'rh_band', recipients: ['QA@Shop.example'] }] })
    expect(r.watches[0]).toMatchObject({ id: 'rh', kind: 'rh_band', params: { lowPct: 40, highPct: 70 }, openAfterMs: 120_000, recipients: ['qa@shop.example'] })
  })

  it('refuses duplicate ids, reserved ids, bad e-mail addresses and impossible bands, naming the field', () => {
    const r = PutWatchesSchema.safeParse({
      watches: [
        { id: 'a', kind: 'rh_band' },
        { id: 'a', kind: 'air_temp_band' },
        { id: 'application-window-temp', kind: 'rh_band' },
        { id: 'b', kind: 'rh_band', recipients: ['not an address'] },
        { id: 'c', kind: 'rh_band', params: { lowPct: 80, highPct: 60 } },
      ],
    })
    expect(r.success).toBe(false)
    const paths = r.error!.issues.map((i) => i.path.join('.'))
    expect(paths).toEqual(expect.arrayContaining(['watches.1.id', 'watches.2.id', 'watches.3.recipients.0', 'watches.4.params']))
  })

  it('reads stored sets leniently: a rule that no longer validates is skipped', () => {
    const stored = [...defaultWatches().slice(0, 2), { rule: { id: 'x', kind: 'gone_kind' }, recipients: [] }]
    const r = fromStored(JSON.parse(JSON.stringify(stored)))
    expect(r.watches).toHaveLength(2)
    expect(r.skipped).toBe(1)
  })
})
