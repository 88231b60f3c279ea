import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { boothSpecs } from '../../../simulator/booths'
import { FAULT_KINDS, makeFault, type FaultKind } from '../../../simulator/faults'
import { createBoothModel, type BoothStep } from '../../../simulator/model'
import { Random } from '../../../simulator/prng'
import { boothTopics, deviceIdFor, modePayload, readingPayload, type Reading } from '../../../simulator/wire'
import { checkReadingPayload, modeSchema, readingSchema } from './wire-rules'

const START = Date.UTC(2026, 11, 1, 10, 0, 0)

function steps(booth: string, seed: number, speed: number, n: number, faults = 0, stepMs = 1000): BoothStep[] {
  const m = createBoothModel({ booth, seed, speed, startMs: START, faults })
  const out: BoothStep[] = []
  for (let i = 1; i <= n; i++) out.push(m.next(START + i * stepMs))
  return out
}

describe('wire rules (local zod mirror)', () => {
  it('accepts the example reading of the design and rejects obvious violations', () => {
    const example =
      '{"ts":"2026-12-01T10:00:00.000Z","seq":123,"airTempC":21.4,"rhPct":54.0,"panelTempC":20.8,"airflowMps":0.41,' +
      '"boothDpPa":6.5,"intakeFilterDpPa":95,"exhaustFilterDpPa":140,"heaterOn":false}'
    expect(checkReadingPayload(example, START)).toEqual({ ok: true })
    expect(checkReadingPayload('{"ts":"2026-12-01T10:00:00.000Z"}', START).ok).toBe(true)
    expect(checkReadingPayload('{"seq":1}', START).ok).toBe(false)
    expect(checkReadingPayload('{"ts":"2026-12-01T10:00:00.000Z","rhPct":140}', START).ok).toBe(false)
    expect(checkReadingPayload('{"ts":"2026-12-01T10:06:00.000Z"}', START).ok).toBe(false)
    expect(checkReadingPayload('{"ts":"2026-12-01T10:00:00.000Z","airTempC":1e999}', START).ok).toBe(false)
  })
})

describe('clean messages', () => {
  it('all pass the wire rules: every demo and generated booth, several speeds, thousands of readings', () => {
    let checked = 0
    for (const { booth } of boothSpecs(6)) {
      for (const [speed, seed] of [
        [1, 1],
        [30, 2],
        [500, 3],
      ] as const) {
        for (const s of steps(booth, seed, speed, 800)) {
          if (s.payload === null) continue
          const result = checkReadingPayload(s.payload, s.nowMs)
          if (!result.ok) throw new Error(`${booth} ×${speed}: ${result.reason}: ${s.payload}`)
          expect(s.fault).toBeUndefined()
          checked += 1
        }
      }
    }
    expect(checked).toBeGreaterThan(13_000)
  })

  it('pass for arbitrary seeds, speeds and rates (property)', () => {
    fc.assert(
      fc.property(
        fc.integer(),
        fc.constantFrom(...boothSpecs(6).map((b) => b.booth)),
        fc.double({ min: 0.5, max: 2000, noNaN: true }),
        fc.integer({ min: 50, max: 3000 }),
        (seed, booth, speed, stepMs) => {
          for (const s of steps(booth, seed, speed, 200, 0, stepMs)) {
            if (s.payload !== null) expect(checkReadingPayload(s.payload, s.nowMs)).toEqual({ ok: true })
          }
        },
      ),
      { numRuns: 25 },
    )
  })

  it('serialise mode messages and topics in the wire format', () => {
    expect(modeSchema.parse(JSON.parse(modePayload('bake', START)))).toEqual({ ts: '2026-12-01T10:00:00.000Z', mode: 'bake' })
    expect(boothTopics('larkspur', 'downdraft-1')).toEqual({
      reading: 'boothbeat/v1/larkspur/downdraft-1/reading',
      mode: 'boothbeat/v1/larkspur/downdraft-1/mode',
      status: 'boothbeat/v1/larkspur/downdraft-1/status',
    })
    expect(deviceIdFor('larkspur', 'prep-deck')).toBe('larkspur-prep-deck')
    expect(() => boothTopics('larkspur', 'a/#')).toThrow(RangeError)
  })
})

describe('faults', () => {
  it.each([0.02, 0.1])('replace roughly the requested fraction (%s) of messages, each one breaking a rule', (fraction) => {
    let sent = 0
    let faulty = 0
    let invalid = 0
    const kinds = new Set<FaultKind>()
    for (const booth of ['downdraft-1', 'downdraft-2', 'prep-deck']) {
      for (const s of steps(booth, 21, 30, 3000, fraction)) {
        if (s.payload === null) continue
        sent += 1
        const result = checkReadingPayload(s.payload, s.nowMs)
        if (!result.ok) invalid += 1
        if (s.fault !== undefined) {
          faulty += 1
          kinds.add(s.fault)
          if (result.ok) throw new Error(`fault ${s.fault} passes the rules: ${s.payload}`)
        } else if (!result.ok) {
          throw new Error(`clean message rejected (${result.reason}): ${s.payload}`)
        }
      }
    }
    // About 9 000 seeded trials: the observed fraction is within ±20 % of the requested one (binomial spread is
    // 7 % of the expectation at 2 %, 3 % at 10 %).
    expect(sent).toBeGreaterThan(8500)
    expect(Math.abs(faulty / (sent * fraction) - 1)).toBeLessThan(0.2)
    expect(invalid).toBe(faulty)
    expect([...kinds].sort()).toEqual([...FAULT_KINDS].sort())
  })

  it('produce every kind as a message that violates the wire rules', () => {
    const reading: Reading = {
      ts: '2026-12-01T10:00:00.000Z',
      seq: 7,
      airTempC: 21.4,
      rhPct: 54,
      panelTempC: 20.8,
      airflowMps: 0.41,
      boothDpPa: 6.5,
      intakeFilterDpPa: 95,
      exhaustFilterDpPa: 140,
      heaterOn: false,
    }
    const sparse: Reading = { ts: '2026-12-01T10:00:00.000Z' }
    expect(readingSchema.safeParse(JSON.parse(readingPayload(reading))).success).toBe(true)
    const rng = new Random(99)
    for (const kind of FAULT_KINDS) {
      for (let i = 0; i < 200; i++) {
        const base = i % 4 === 0 ? sparse : reading
        const fault = makeFault(base, rng, kind)
        expect(fault.kind).toBe(kind)
        const result = checkReadingPayload(fault.payload, Date.parse(reading.ts))
        if (result.ok) throw new Error(`${kind} passes the rules: ${fault.payload}`)
        if (kind === 'oversize') expect(Buffer.byteLength(fault.payload)).toBeGreaterThan(8192)
        if (kind === 'malformed-json') expect(() => JSON.parse(fault.payload) as unknown).toThrow()
      }
    }
  })

  it('are absent without the faults option', () => {
    const all = steps('downdraft-1', 4, 30, 3000)
    expect(all.some((s) => s.fault !== undefined)).toBe(false)
  })
})
