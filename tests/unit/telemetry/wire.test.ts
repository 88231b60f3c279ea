import { describe, expect, it } from 'vitest'
import { parseMode, parseTopic, validateReading } from '../../../server/telemetry/wire'

const now = Date.UTC(2026, 11, 1, 12, 0, 0)
const DAY = 86_400_000
const ok = (o: Record<string, unknown>) => validateReading(JSON.stringify({ ts: new Date(now).toISOString(), ...o }), now, DAY)

describe('parseTopic', () => {
  it('reads site, booth and kind', () => {
    expect(parseTopic('boothbeat/v1/larkspur/downdraft-1/reading')).toEqual({ site: 'larkspur', booth: 'downdraft-1', kind: 'reading' })
  })
  it('refuses other roots, levels and kinds', () => {
    for (const t of ['boothbeat/v2/a/b/reading', 'boothbeat/v1/a/reading', 'boothbeat/v1/a/b/c/reading', 'boothbeat/v1/A/b/reading', 'boothbeat/v1/a/b/other']) {
      expect(parseTopic(t), t).toBeUndefined()
    }
  })
})

describe('validateReading', () => {
  it('accepts a reading with only a timestamp', () => {
    expect(validateReading(`{"ts":"${new Date(now).toISOString()}"}`, now, DAY)).toMatchObject({ ok: true, reading: { tsMs: now } })
  })
  it('accepts a timestamp with an offset and converts it to UTC', () => {
    const r = validateReading('{"ts":"2026-12-01T13:00:00+01:00"}', now, DAY)
    expect(r.ok && r.reading.tsMs).toBe(now)
  })
  it.each([
    ['malformed_json', '{"ts":'],
    ['malformed_json', '{"ts":"2026-12-01T12:00:00Z","airTempC":NaN}'],
    ['not_finite', '{"ts":"2026-12-01T12:00:00Z","rhPct":1e400}'],
    ['wrong_types', '{"airTempC":20}'],
    ['wrong_types', '[1,2]'],
    ['wrong_types', '{"ts":"2026-12-01T12:00:00Z","heaterOn":"yes"}'],
    ['wrong_types', '{"ts":"yesterday"}'],
  ])('refuses %s: %s', (reason, payload) => {
    expect(validateReading(payload, now, DAY)).toMatchObject({ ok: false, reason })
  })
  it('refuses values outside physical ranges at the edges', () => {
    expect(ok({ rhPct: 100 }).ok).toBe(true)
    expect(ok({ rhPct: 100.1 })).toMatchObject({ reason: 'out_of_range' })
    expect(ok({ airTempC: -40 }).ok).toBe(true)
    expect(ok({ airTempC: -40.5 })).toMatchObject({ reason: 'out_of_range' })
    expect(ok({ panelTempC: 150.5 })).toMatchObject({ reason: 'out_of_range' })
    expect(ok({ airflowMps: -0.01 })).toMatchObject({ reason: 'out_of_range' })
  })
  it('bounds the device timestamp: 5 minutes ahead, the configured age behind', () => {
    expect(validateReading(`{"ts":"${new Date(now + 299_000).toISOString()}"}`, now, DAY).ok).toBe(true)
    expect(validateReading(`{"ts":"${new Date(now + 301_000).toISOString()}"}`, now, DAY)).toMatchObject({ reason: 'ts_future' })
    expect(validateReading(`{"ts":"${new Date(now - DAY - 1000).toISOString()}"}`, now, DAY)).toMatchObject({ reason: 'ts_too_old' })
  })
  it('refuses payloads over 8 KB before parsing them', () => {
    expect(validateReading('x'.repeat(8 * 1024 + 1), now, DAY)).toMatchObject({ reason: 'too_large' })
  })
})

describe('parseMode', () => {
  it('reads a bare word or JSON', () => {
    expect(parseMode(Buffer.from('bake'), now)).toEqual({ mode: 'bake', tsMs: now })
    expect(parseMode(Buffer.from('{"ts":"2026-12-01T11:59:00Z","mode":"spray"}'), now)).toEqual({ mode: 'spray', tsMs: now - 60_000 })
  })
  it('refuses unknown modes', () => {
    expect(parseMode(Buffer.from('party'), now)).toBeUndefined()
    expect(parseMode(Buffer.from('{"mode":"dry"}'), now)).toBeUndefined()
  })
})
