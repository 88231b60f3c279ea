// A booth cycle simulated in the past at real time (speed 1) from a plan of controller modes: the readings the
// booth would have sent, and when its coats and its bake happened. The demo stores it as the history of a finished
// job, so its coats keep the flash times the data sheets ask for (the free-running cycle does not know them).

import { createBoothModel } from './model'
import type { Mode, Reading } from './wire'

export interface PlannedSegment {
  mode: Mode
  minutes: number
}

export interface PastReading {
  tsMs: number
  reading: Reading
  mode: Mode
}

export interface PastCycle {
  readings: PastReading[]
  /** The spray segments, in order: one per coat. */
  coats: { startMs: number; endMs: number }[]
  /** The bake segment (ramp and hold), or null when the plan has none. */
  bake: { startMs: number; endMs: number } | null
  /** End of the plan. */
  endMs: number
}

const MINUTE = 60_000

export function planMinutes(plan: readonly PlannedSegment[]): number {
  return plan.reduce((sum, s) => sum + s.minutes, 0)
}

/** Runs the model at 1 Hz from `startMs`, holding each planned mode for its minutes (the physics follow the mode). */
export function simulatePlannedCycle(opts: { booth: string; seed: string | number; startMs: number; plan: readonly PlannedSegment[] }): PastCycle {
  const model = createBoothModel({ booth: opts.booth, seed: opts.seed, startMs: opts.startMs, initialPhase: 'idle', dropouts: false, clockSkewMs: 0 })
  const readings: PastReading[] = []
  const coats: PastCycle['coats'] = []
  let bake: PastCycle['bake'] = null
  let t = opts.startMs
  for (const seg of opts.plan) {
    const end = t + Math.round(seg.minutes * MINUTE)
    model.setOverride({ mode: seg.mode })
    if (seg.mode === 'spray') coats.push({ startMs: t, endMs: end })
    if (seg.mode === 'bake') bake = { startMs: t, endMs: end }
    for (t += 1000; t <= end; t += 1000) {
      const step = model.next(t)
      if (step.reading) readings.push({ tsMs: step.tsMs, reading: step.reading, mode: step.mode })
    }
    t = end
  }
  return { readings, coats, bake, endMs: t }
}
