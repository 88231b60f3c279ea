// Test helpers for the watches: compact recorded sequences and a runner (not a test file).
import { createThresholdState, stepThreshold, type ThresholdEvent, type ThresholdRule } from '#shared/watch'

export const T0 = Date.UTC(2025, 5, 12, 13, 0, 0)
export const S = 1000
export const MIN = 60_000

/** Expands [seconds, value] pairs into 1 Hz readings: each value holds until the next pair's second. */
export function recorded(pairs: readonly (readonly [number, number | null])[], endSec: number): { t: number; value: number | null }[] {
  const out: { t: number; value: number | null }[] = []
  for (let i = 0; i < pairs.length; i++) {
    const [from, value] = pairs[i]!
    const to = i + 1 < pairs.length ? pairs[i + 1]![0] : endSec
    for (let s = from; s < to; s++) out.push({ t: T0 + s * S, value })
  }
  return out
}

/** Runs a threshold rule over readings; returns the events with `at` in seconds after T0 for readability. */
export function runThreshold(rule: ThresholdRule, readings: readonly { t: number; value: number | null | undefined }[]) {
  let state = createThresholdState()
  const events: (ThresholdEvent & { sec: number })[] = []
  for (const r of readings) {
    const step = stepThreshold(rule, state, r)
    state = step.state
    if (step.event) events.push({ ...step.event, sec: (step.event.at - T0) / S })
  }
  return { state, events }
}
