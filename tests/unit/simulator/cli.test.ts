import { describe, expect, it } from 'vitest'
import { boothSpecs, kindForBooth } from '../../../simulator/booths'
import { DEFAULT_FAULT_FRACTION, parseCliArgs, parseFaultFraction, UsageError } from '../../../simulator/cli'
import { hashSeed, mulberry32, Random } from '../../../simulator/prng'

describe('command line', () => {
  it('parses the documented flags', () => {
    const cli = parseCliArgs(
      ['--booths', '5', '--speed', '30', '--seed', '42', '--url', 'mqtt://127.0.0.1:1884', '--rate', '2', '--count', '10', '--site', 'larkspur'],
      {},
    )
    expect(cli.sim).toEqual({ booths: 5, speed: 30, seed: 42, url: 'mqtt://127.0.0.1:1884', rateHz: 2, count: 10, site: 'larkspur' })
    expect(parseCliArgs(['--seed', 'demo-day'], {}).sim.seed).toBe('demo-day')
    expect(parseCliArgs(['--speed=12.5'], {}).sim.speed).toBe(12.5)
  })

  it('takes --faults with or without a value', () => {
    expect(parseCliArgs(['--faults'], {}).sim.faults).toBe(DEFAULT_FAULT_FRACTION)
    expect(parseCliArgs(['--faults', '--booths', '2'], {}).sim).toEqual({ faults: DEFAULT_FAULT_FRACTION, booths: 2 })
    expect(parseCliArgs(['--faults', '0.05'], {}).sim.faults).toBe(0.05)
    expect(parseCliArgs(['--faults=5%'], {}).sim.faults).toBe(0.05)
    expect(parseFaultFraction('2')).toBe(0.02)
    expect(parseFaultFraction('1')).toBe(1)
    expect(() => parseFaultFraction('150%')).toThrow(UsageError)
    expect(() => parseFaultFraction('abc')).toThrow(UsageError)
  })

  it('falls back to MQTT_URL and DEMO_DEVICE_PASSWORD, flags first', () => {
    const env = { MQTT_URL: 'mqtt://broker.test:1883', DEMO_DEVICE_PASSWORD: 'from-env' }
    expect(parseCliArgs([], env).sim).toEqual({ url: 'mqtt://broker.test:1883', password: 'from-env' })
    expect(parseCliArgs(['--password', 'flag', '--url', 'mqtt://127.0.0.1:1'], env).sim).toEqual({
      password: 'flag',
      url: 'mqtt://127.0.0.1:1',
    })
  })

  it('takes a humidity drift that comes and goes', () => {
    expect(parseCliArgs(['--humidity-drift', '5', '--drift-peak', '12'], {}).sim).toEqual({
      humidityDriftPct: 5,
      model: { humidityDriftEpisodes: { peakPct: 12, holdHours: 1, restHours: 2 } },
    })
  })

  it('rejects bad arguments with a usage error', () => {
    for (const argv of [['--drift-peak', '0'], ['--drift-peak'], ['--booths', '0'], ['--booths', '1.5'], ['--speed', '-1'], ['--rate'], ['--site', 'Lark Spur'], ['--url', 'http://x'], ['--what']]) {
      expect(() => parseCliArgs(argv, {}), argv.join(' ')).toThrow(UsageError)
    }
  })
})

describe('booth list', () => {
  it('starts with the demo booths, then generated sim booths', () => {
    expect(boothSpecs(2).map((b) => b.booth)).toEqual(['downdraft-1', 'downdraft-2'])
    expect(boothSpecs(6)).toEqual([
      { booth: 'downdraft-1', kind: 'downdraft' },
      { booth: 'downdraft-2', kind: 'downdraft' },
      { booth: 'prep-deck', kind: 'prep-deck' },
      { booth: 'sim-booth-4', kind: 'downdraft' },
      { booth: 'sim-booth-5', kind: 'downdraft' },
      { booth: 'sim-booth-6', kind: 'prep-deck' },
    ])
    expect(kindForBooth('sim-booth-6')).toBe('prep-deck')
    expect(() => boothSpecs(0)).toThrow(RangeError)
  })
})

describe('PRNG', () => {
  it('is deterministic, uniform-looking and seed-sensitive', () => {
    const a = mulberry32(123)
    const b = mulberry32(123)
    const xs = Array.from({ length: 10_000 }, () => a())
    expect(Array.from({ length: 10_000 }, () => b())).toEqual(xs)
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0)
    expect(Math.max(...xs)).toBeLessThan(1)
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length
    expect(Math.abs(mean - 0.5)).toBeLessThan(0.01)
    expect(mulberry32(124)()).not.toBe(mulberry32(123)())
    expect(hashSeed(1, 'downdraft-1')).not.toBe(hashSeed(2, 'downdraft-1'))
    expect(hashSeed(1)).not.toBe(hashSeed('1'))
  })

  it('draws normal deviates with the right mean and spread', () => {
    const r = new Random(5)
    const xs = Array.from({ length: 20_000 }, () => r.normal(10, 2))
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length)
    expect(mean).toBeCloseTo(10, 1)
    expect(sd).toBeGreaterThan(1.95)
    expect(sd).toBeLessThan(2.05)
  })
})
