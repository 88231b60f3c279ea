import { describe, expect, it } from 'vitest'
import { createOnsetState, DEFAULT_ONSET_RULE, markBaking, stepOnset, type OnsetEvent, type OnsetReading } from '#shared/bake/onset'
import { MIN, S, T0, minutesOf, simulatedBake } from './helpers'

function run(readings: readonly OnsetReading[], state = createOnsetState()) {
  const events: OnsetEvent[] = []
  for (const r of readings) {
    const step = stepOnset(DEFAULT_ONSET_RULE, state, r)
    state = step.state
    if (step.event) events.push(step.event)
  }
  return { state, events }
}

/** Every 10 s for `minutes`, heater(m) and panel(m) as functions of minutes. */
function readings(minutes: number, heater: (m: number) => boolean | null, panel: (m: number) => number | null): OnsetReading[] {
  const out: OnsetReading[] = []
  for (let sec = 0; sec <= minutes * 60; sec += 10) out.push({ t: T0 + sec * S, heaterOn: heater(sec / 60), panelTempC: panel(sec / 60) })
  return out
}

describe('bake onset from heater + rising panel temperature', () => {
  it('starts when the heater has been on 2 min and the panel rose 3 K, dated to the heater coming on; ends once cooled back', () => {
    // Heater on 5…45 min; panel 22 °C, +2 K/min from 5 min up to 60 °C, then falls 2 K/min from 45 min.
    const panel = (m: number) => (m < 5 ? 22 : m < 45 ? Math.min(60, 22 + 2 * (m - 5)) : Math.max(22, 60 - 2 * (m - 45)))
    const { events } = run(readings(90, (m) => m >= 5 && m < 45, panel))
    // Start condition met at 7 min (on for 2 min, +4 K); dated 5 min. End: off ≥ 5 min and panel ≤ 22 + 8 = 30 °C:
    // 60 − 2(m − 45) ≤ 30 → m ≥ 60 min.
    expect(events.map((e) => [e.type, minutesOf(e.at)])).toEqual([
      ['start', 5],
      ['end', 60],
    ])
  })

  it('the heater cycling on for a minute is no bake, nor is heat without a rise', () => {
    const blips = run(readings(30, (m) => Math.floor(m) % 3 === 0, (m) => 22 + m / 10))
    expect(blips.events).toEqual([])
    const noRise = run(readings(30, () => true, () => 22.5))
    expect(noRise.events).toEqual([])
  })

  it('missing heater values (dropouts) neither start nor end a bake', () => {
    const panel = (m: number) => (m < 5 ? 22 : Math.min(60, 22 + 2 * (m - 5)))
    const { events, state } = run(readings(40, (m) => (m >= 5 ? (Math.floor(m * 6) % 4 === 0 ? null : true) : false), panel))
    expect(events.map((e) => e.type)).toEqual(['start'])
    expect(state.baking).toBe(true)
  })

  it('a bake already running (opened by a tech) is ended by the heater rule after 45 min off whatever the temperature', () => {
    const start = markBaking(createOnsetState(), T0, 22)
    const { events } = run(readings(60, () => false, () => 55), start)
    expect(events.map((e) => [e.type, minutesOf(e.at)])).toEqual([['end', 45]])
  })

  it('a simulated downdraft cycle gives exactly one start (at the heater turning on) and one end', () => {
    // Simulated on for 40 min past the booth's return to idle, so the panel has time to cool back.
    const b = simulatedBake({ seed: 11, dropouts: true }, 5_000, 40 * MIN)
    const { events } = run(b.samples.map((s) => ({ t: s.t, heaterOn: s.heaterOn, panelTempC: s.panelTempC, airTempC: s.airTempC })))
    expect(events.map((e) => e.type)).toEqual(['start', 'end'])
    // The end comes after the model's cool phase began (heater off), at most 45 min after it.
    expect(events[1]!.at).toBeGreaterThan(b.coolAtMs + 5 * MIN)
    expect(events[1]!.at).toBeLessThanOrEqual(b.coolAtMs + 45 * MIN + 10 * S)
    // The model's heater comes on with the bake mode; the sample stream may miss the first seconds (dropouts).
    expect(Math.abs(events[0]!.at - b.startMs)).toBeLessThan(MIN)
  })
})
