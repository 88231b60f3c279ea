import { describe, expect, it } from 'vitest'
import { checkSilence, createSilenceState, markSeen, type SilenceState } from '#shared/watch'
import { S, T0 } from './helpers'

const rule = { silentAfterMs: 60 * S }

describe('sensor silence', () => {
  it('opens at silentAfterMs of silence and not before, once, and the next reading clears it', () => {
    let s: SilenceState = createSilenceState()
    s = markSeen(rule, s, T0).state
    expect(checkSilence(rule, s, T0 + 59_999).event).toBeUndefined()
    const open = checkSilence(rule, s, T0 + 60_000)
    expect(open.event).toEqual({ type: 'open', at: T0 + 60_000, value: 60_000, limit: 60_000, peak: 60_000 })
    s = open.state
    expect(checkSilence(rule, s, T0 + 120_000).event).toBeUndefined() // no duplicate open
    const clear = markSeen(rule, s, T0 + 95_000)
    expect(clear.event).toEqual({ type: 'clear', at: T0 + 95_000, value: 95_000, limit: 60_000, peak: 95_000 })
    expect(clear.state).toEqual({ lastSeenMs: T0 + 95_000, open: false })
  })

  it('a recorded 1 Hz stream with one 75 s dropout opens and clears once', () => {
    let s = createSilenceState(T0)
    const types: string[] = []
    for (let sec = 0; sec <= 300; sec++) {
      const now = T0 + sec * S
      if (sec < 100 || sec >= 175) {
        const step = markSeen(rule, s, now)
        s = step.state
        if (step.event) types.push(`${step.event.type}@${sec}`)
      }
      const step = checkSilence(rule, s, now)
      s = step.state
      if (step.event) types.push(`${step.event.type}@${sec}`)
    }
    expect(types).toEqual(['open@159', 'clear@175'])
  })

  it('startMs arms it for a sensor that never reports; without it nothing opens', () => {
    expect(checkSilence(rule, createSilenceState(T0), T0 + 60_000).event?.type).toBe('open')
    expect(checkSilence(rule, createSilenceState(), T0 + 1e9).event).toBeUndefined()
  })

  it('checkSilence clears when lastSeenMs was moved on by the caller', () => {
    const s: SilenceState = { lastSeenMs: T0 + 100_000, open: true }
    expect(checkSilence(rule, s, T0 + 100_000).event?.type).toBe('clear')
  })

  it('ignores older or non-finite times and a zero limit', () => {
    const s = createSilenceState(T0)
    expect(markSeen(rule, s, T0 - 1).state).toBe(s)
    expect(markSeen(rule, s, Number.NaN).state).toBe(s)
    expect(checkSilence(rule, s, Number.NaN).state).toBe(s)
    expect(checkSilence({ silentAfterMs: 0 }, s, T0 + 1e9).event).toBeUndefined()
    expect(checkSilence({ silentAfterMs: Number.NaN }, s, T0 + 1e9).event).toBeUndefined()
  })
})
