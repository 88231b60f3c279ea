import { describe, expect, it } from 'vitest'
import { createSubgroupState, flushSubgroup, stepSubgroup, type Subgroup, type SubgroupState } from '#shared/watch'

// Windows are aligned on the epoch; T0 here is a whole minute.
const T0 = Date.UTC(2025, 5, 12, 13, 0, 0)
const params = { periodMs: 60_000, minCount: 30 }

function feed(readings: readonly [number, number | null][], p = params) {
  let s: SubgroupState = createSubgroupState()
  const out: Subgroup[] = []
  for (const [sec, x] of readings) {
    const step = stepSubgroup(p, s, T0 + sec * 1000, x)
    s = step.state
    if (step.closed) out.push(step.closed)
  }
  return { s, out }
}

describe('subgroup means', () => {
  it('averages 1 Hz readings per minute and emits each mean at the end of its window', () => {
    const readings: [number, number][] = Array.from({ length: 181 }, (_, sec) => [sec, sec < 60 ? 50 : sec < 120 ? 52 + (sec % 2) : 58])
    const { out, s } = feed(readings)
    expect(out).toEqual([
      { mean: 50, at: T0 + 60_000, count: 60 },
      { mean: 52.5, at: T0 + 120_000, count: 60 },
      { mean: 58, at: T0 + 180_000, count: 60 }, // closed by the reading at 180 s
    ])
    expect(s).toMatchObject({ count: 1 }) // the window starting at 180 s is open
  })

  it('drops a window with fewer than minCount readings', () => {
    const readings: [number, number][] = [
      ...Array.from({ length: 20 }, (_, i): [number, number] => [i, 40]),
      ...Array.from({ length: 60 }, (_, i): [number, number] => [60 + i, 45]),
      [120, 45],
    ]
    expect(feed(readings).out).toEqual([{ mean: 45, at: T0 + 120_000, count: 60 }])
  })

  it('null / NaN readings and late readings do nothing', () => {
    const { s } = feed([[0, 50], [1, null], [2, Number.NaN], [61, 51]])
    expect(s).toMatchObject({ count: 1, sum: 51 })
    expect(stepSubgroup(params, s, T0 + 5000, 99).state).toBe(s) // a reading for the closed window
  })

  it('flush closes a window once its end has passed, and a reading still stamped in it is not counted twice', () => {
    const { s } = feed(Array.from({ length: 40 }, (_, i): [number, number] => [i, 50]))
    expect(flushSubgroup(params, s, T0 + 59_999).closed).toBeUndefined()
    const f = flushSubgroup(params, s, T0 + 60_000)
    expect(f.closed).toEqual({ mean: 50, at: T0 + 60_000, count: 40 })
    expect(flushSubgroup(params, f.state, T0 + 70_000).closed).toBeUndefined()
    const late = stepSubgroup(params, f.state, T0 + 45_000, 50)
    expect(late.state).toBe(f.state)
    const next = stepSubgroup(params, f.state, T0 + 61_000, 50)
    expect(next.closed).toBeUndefined()
  })

  it('no period: every reading is its own subgroup', () => {
    expect(feed([[0, 1], [1, 2]], { periodMs: 0, minCount: 1 }).out.map((g) => g.mean)).toEqual([1, 2])
  })
})
