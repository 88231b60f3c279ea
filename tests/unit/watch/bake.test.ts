import { describe, expect, it } from 'vitest'
import { checkBake, createBakeState, endBake, startBake, stepBake, type BakeEvent, type BakeState } from '#shared/watch'
import { MIN, S, T0 } from './helpers'

const rule = { targetC: 60, withinMs: 15 * MIN }

/** A bake from T0: readings every 10 s following temp(sec); timers checked on every reading. */
function bake(temp: (sec: number) => number | null, untilSec: number) {
  let s: BakeState = startBake(createBakeState(), T0)
  const events: (BakeEvent & { sec: number })[] = []
  for (let sec = 0; sec <= untilSec; sec += 10) {
    const step = stepBake(rule, s, { t: T0 + sec * S, value: temp(sec) })
    s = step.state
    if (step.event) events.push({ ...step.event, sec })
    const tick = checkBake(rule, s, T0 + sec * S)
    s = tick.state
    if (tick.event) events.push({ ...tick.event, sec })
  }
  return { s, events }
}

describe('bake not reaching temperature', () => {
  it('a recorded slow heat-up opens at the 15 min deadline, not before, and clears when 60 °C is reached', () => {
    // Heats 1 °C per 30 s from 20 °C: reaches 60 °C at 1200 s (20 min).
    const { events } = bake((sec) => 20 + sec / 30, 1500)
    expect(events.map((e) => [e.type, e.sec, e.value, e.limit])).toEqual([
      ['open', 900, 50, 60],
      ['clear', 1200, 60, 60],
    ])
    expect(events[0]!.since).toBe(T0)
  })

  it('reaching the target before the deadline raises nothing, and later dips do not either', () => {
    const { events, s } = bake((sec) => (sec < 600 ? 20 + sec / 10 : 55), 2400)
    expect(events).toEqual([])
    expect(s.reached).toBe(true)
  })

  it('no temperature at all opens with value null at the deadline', () => {
    const { events } = bake(() => null, 1000)
    expect(events).toEqual([{ type: 'open', at: T0 + 15 * MIN, value: null, limit: 60, peak: null, since: T0, sec: 900 }])
  })

  it('the bake ending clears an open alert (value null) and resets', () => {
    const { s } = bake(() => 40, 1000)
    const end = endBake(rule, s, T0 + 20 * MIN)
    expect(end.event).toMatchObject({ type: 'clear', value: null, peak: 40 })
    expect(end.state).toEqual(createBakeState())
    expect(endBake(rule, createBakeState(), T0).event).toBeUndefined()
  })

  it('nothing happens outside a bake', () => {
    const s = createBakeState()
    expect(stepBake(rule, s, { t: T0, value: 10 }).state).toBe(s)
    expect(checkBake(rule, s, T0 + 1e9).event).toBeUndefined()
  })
})
