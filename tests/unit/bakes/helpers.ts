// Test helpers for bakes (not a test file): hand-built sample series and simulated bake cycles.
import type { BakeSample } from '#shared/bake/phases'
import { createBoothModel, type BoothModelOptions, type BoothStep } from '../../../simulator/model'

export const T0 = Date.UTC(2026, 10, 2, 8, 0, 0)
export const S = 1000
export const MIN = 60_000

/** Samples every `stepSec` from 0 to endSec (inclusive) following panel(sec) / heater(sec); null = no reading. */
export function series(
  endSec: number,
  stepSec: number,
  panel: (sec: number) => number | null,
  heater: (sec: number) => boolean | null = () => null,
  air?: (sec: number) => number | null,
): BakeSample[] {
  const out: BakeSample[] = []
  for (let sec = 0; sec <= endSec; sec += stepSec) {
    const p = panel(sec)
    if (p === null && !air) continue
    out.push({ t: T0 + sec * S, panelTempC: p, heaterOn: heater(sec), ...(air ? { airTempC: air(sec) } : {}) })
  }
  return out
}

/** Minutes after T0 of an epoch ms, for readable expectations. */
export const minutesOf = (ms: number) => (ms - T0) / MIN

export interface SimulatedBake {
  samples: BakeSample[]
  steps: BoothStep[]
  /** Device time the controller reported bake, and the time it was back in idle. */
  startMs: number
  endMs: number
  /** The model's own phase changes (device time): ramp → hold, hold → cool. */
  holdAtMs: number
  coolAtMs: number
}

/** Runs a downdraft booth from idle through one full job with its bake, with readings every stepMs. */
export function simulatedBake(opts: Partial<BoothModelOptions> = {}, stepMs = 5_000, tailMs = 0): SimulatedBake {
  const m = createBoothModel({ booth: 'downdraft-1', seed: 7, startMs: T0, speed: 1, initialPhase: 'idle', ...opts })
  const steps: BoothStep[] = []
  let start: BoothStep | undefined
  for (let i = 1; i < 8 * 720; i++) {
    const s = m.next(T0 + i * stepMs)
    steps.push(s)
    if (!start && s.mode === 'bake') start = s
    if (start && s.mode === 'idle') {
      const idleAt = s.tsMs
      for (let k = 1; k * stepMs <= tailMs; k++) steps.push(m.next(T0 + (i + k) * stepMs))
      const samples = steps
        .filter((x) => x.reading)
        .map((x) => ({ t: x.tsMs, panelTempC: x.reading!.panelTempC ?? null, airTempC: x.reading!.airTempC ?? null, heaterOn: x.reading!.heaterOn ?? null }))
      return {
        samples,
        steps,
        startMs: start.tsMs,
        endMs: idleAt,
        holdAtMs: steps.find((x) => x.phase === 'bakeHold')!.tsMs,
        coolAtMs: steps.find((x) => x.phase === 'cool')!.tsMs,
      }
    }
  }
  throw new Error('no bake cycle in the simulated time')
}
