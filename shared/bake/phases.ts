// Phases of a bake cycle from the object (panel) temperature: purge → ramp → hold → cool.
//
//   purge  from the start of the bake until the heater comes on or the panel starts to warm (riseK above its
//          starting value) — the booth clears the spray air before it heats;
//   ramp   until the panel first reaches the hold band (target − holdBandK);
//   hold   until the panel is last seen in the hold band (brief dips inside are listed, not split out);
//   cool   from then to the end of the bake.
// When the panel never reaches the band, the ramp ends where the heater went off, or at the peak when the
// panel then fell by coolDropK, and the rest is cool. Without any panel reading the air temperature is used
// (marked: the panel lags the air, so the phases are then only indicative).
//
// Units: °C, epoch ms, minutes. The thresholds are our own working choices (stated with the defaults below),
// not from a cited source; the booth maker's and the TDS's figures win where they differ.
// Invalid input gives `valid: false` and empty phases; the function never throws.

import { isFiniteNumber, isRecord } from '../cure/guards'

export interface BakeSample {
  /** Epoch ms. */
  t: number
  panelTempC?: number | null
  airTempC?: number | null
  heaterOn?: boolean | null
}

export type PhaseName = 'purge' | 'ramp' | 'hold' | 'cool'

export interface PhaseSpan {
  phase: PhaseName
  startMs: number
  endMs: number
}

export interface TimeSpan {
  startMs: number
  endMs: number
}

export interface PhaseOptions {
  /** Hold (object) temperature, °C; absent = inferred from the peak (see `targetInferred`). */
  targetC?: number | null
  /** The panel is "at temperature" from target − holdBandK, K. Default 2 (our choice: a controller's band). */
  holdBandK?: number
  /** A reading is held for at most this long, ms (as the cure engine). Default 120 000. */
  maxGapMs?: number
  /** Panel rise above its start value that marks the end of the purge without heater data, K. Default 2. */
  riseK?: number
  /** Fall below the peak that ends a ramp that never reached the band, K. Default 3. */
  coolDropK?: number
  /** Shorter stays below the band during the hold are noise, not dips, ms. Default 60 000. */
  minDipMs?: number
  /** Without a target, a rise smaller than this is no bake at all (no hold), K. Default 10. */
  minBakeRiseK?: number
}

export const PHASE_DEFAULTS = {
  holdBandK: 2,
  maxGapMs: 120_000,
  riseK: 2,
  coolDropK: 3,
  minDipMs: 60_000,
  minBakeRiseK: 10,
} as const

export type PhaseReason =
  /** No usable temperature in the bake window. */
  | 'no-data'
  /** No panel reading: phases come from the air temperature. */
  | 'air-temperature-used'
  /** No target was given: the hold temperature was taken from the peak. */
  | 'target-inferred'
  /** The panel never reached the hold band. */
  | 'target-not-reached'
  /** The panel went below the band for a while during the hold. */
  | 'dip-during-hold'
  /** Readings were missing for longer than the hold allows. */
  | 'data-gap'
  /** Readings stopped before the end of the bake (power cut, device off). */
  | 'readings-stopped'

export interface PhaseResult {
  valid: boolean
  phases: PhaseSpan[]
  /** Which channel the phases come from. */
  channel: 'panelTempC' | 'airTempC' | null
  targetC: number | null
  targetInferred: boolean
  holdBandK: number
  startTempC: number | null
  peakC: number | null
  peakAtMs: number | null
  heaterOnAtMs: number | null
  reachedTarget: boolean
  reachedAtMs: number | null
  holdMinutes: number
  /** Minutes with the reading at or above the target (zero-order hold, within maxGapMs). */
  minutesAtOrAboveTarget: number
  dips: (TimeSpan & { minC: number })[]
  gaps: TimeSpan[]
  /** Time of the last reading, or null. */
  lastReadingAtMs: number | null
  readingsStopped: boolean
  reasons: PhaseReason[]
}

interface Point {
  t: number
  v: number
  heater: boolean | null
}

function invalid(holdBandK: number): PhaseResult {
  return {
    valid: false,
    phases: [],
    channel: null,
    targetC: null,
    targetInferred: false,
    holdBandK,
    startTempC: null,
    peakC: null,
    peakAtMs: null,
    heaterOnAtMs: null,
    reachedTarget: false,
    reachedAtMs: null,
    holdMinutes: 0,
    minutesAtOrAboveTarget: 0,
    dips: [],
    gaps: [],
    lastReadingAtMs: null,
    readingsStopped: false,
    reasons: [],
  }
}

function option(options: PhaseOptions | undefined, key: keyof typeof PHASE_DEFAULTS): number {
  const v = isRecord(options) ? (options as Record<string, unknown>)[key] : undefined
  return isFiniteNumber(v) && v >= 0 ? v : PHASE_DEFAULTS[key]
}

/** Median of the values around index i (window of 2·half + 1): one noisy reading does not move a threshold. */
function medianAround(points: readonly Point[], i: number, half = 2): number {
  const w: number[] = []
  for (let k = Math.max(0, i - half); k <= Math.min(points.length - 1, i + half); k++) w.push(points[k]!.v)
  w.sort((a, b) => a - b)
  return w[Math.floor(w.length / 2)]!
}

/**
 * Minutes within [startMs, endMs] with the held reading at or above `levelC`: each reading holds until the
 * next one, for at most maxGapMs. Pure; NaN on invalid times.
 */
export function minutesAtOrAbove(
  samples: readonly BakeSample[],
  startMs: number,
  endMs: number,
  levelC: number,
  options: { maxGapMs?: number; channel?: 'panelTempC' | 'airTempC' } = {},
): number {
  if (!isFiniteNumber(startMs) || !isFiniteNumber(endMs) || endMs < startMs || !isFiniteNumber(levelC)) return Number.NaN
  if (!Array.isArray(samples)) return Number.NaN
  const maxGap = isFiniteNumber(options.maxGapMs) && options.maxGapMs >= 0 ? options.maxGapMs : PHASE_DEFAULTS.maxGapMs
  const channel = options.channel ?? (samples.some((s) => isRecord(s) && isFiniteNumber(s.panelTempC)) ? 'panelTempC' : 'airTempC')
  const pts = usablePoints(samples, channel, Number.NEGATIVE_INFINITY, endMs)
  return heldMsAtOrAbove(pts, startMs, endMs, levelC, maxGap) / 60_000
}

function heldMsAtOrAbove(pts: readonly Point[], startMs: number, endMs: number, levelC: number, maxGap: number): number {
  let ms = 0
  for (let i = 0; i < pts.length; i++) {
    const p = pts[i]!
    if (!(p.v >= levelC)) continue
    const next = i + 1 < pts.length ? pts[i + 1]!.t : Number.POSITIVE_INFINITY
    const a = Math.max(startMs, p.t)
    const b = Math.min(endMs, next, p.t + maxGap)
    if (b > a) ms += b - a
  }
  return ms
}

function usablePoints(samples: readonly BakeSample[], channel: 'panelTempC' | 'airTempC', fromMs: number, toMs: number): Point[] {
  const out: Point[] = []
  for (const s of samples as readonly unknown[]) {
    if (!isRecord(s) || !isFiniteNumber(s.t)) continue
    const v = s[channel]
    if (!isFiniteNumber(v) || s.t < fromMs || s.t > toMs) continue
    out.push({ t: s.t, v, heater: typeof s.heaterOn === 'boolean' ? s.heaterOn : null })
  }
  return out.sort((a, b) => a.t - b.t)
}

/**
 * Finds the phases of the bake that ran over [startMs, endMs] (endMs = now for a running bake).
 * See the file header for the rules and PHASE_DEFAULTS for the thresholds.
 */
export function detectPhases(
  samples: readonly BakeSample[],
  startMs: number,
  endMs: number,
  options?: PhaseOptions,
): PhaseResult {
  const holdBandK = option(options, 'holdBandK')
  if (!Array.isArray(samples) || !isFiniteNumber(startMs) || !isFiniteNumber(endMs) || endMs < startMs) return invalid(holdBandK)
  const maxGap = option(options, 'maxGapMs')
  const riseK = option(options, 'riseK')
  const coolDropK = option(options, 'coolDropK')
  const minDipMs = option(options, 'minDipMs')
  const minBakeRiseK = option(options, 'minBakeRiseK')
  const rawTarget = isRecord(options) ? options.targetC : undefined
  if (rawTarget !== undefined && rawTarget !== null && !isFiniteNumber(rawTarget)) return invalid(holdBandK)

  const result = invalid(holdBandK)
  result.valid = true
  const hasPanel = samples.some((s) => isRecord(s) && isFiniteNumber(s.t) && s.t >= startMs && s.t <= endMs && isFiniteNumber(s.panelTempC))
  const channel = hasPanel ? 'panelTempC' : 'airTempC'
  const pts = usablePoints(samples, channel, startMs, endMs)
  // Heater state from every sample in the window (it may arrive on a message without temperatures).
  const heater: { t: number; on: boolean }[] = []
  for (const s of samples as readonly unknown[]) {
    if (isRecord(s) && isFiniteNumber(s.t) && s.t >= startMs && s.t <= endMs && typeof s.heaterOn === 'boolean') heater.push({ t: s.t, on: s.heaterOn })
  }
  heater.sort((a, b) => a.t - b.t)
  if (!pts.length) {
    result.reasons.push('no-data')
    if (endMs > startMs) result.gaps.push({ startMs, endMs })
    return result
  }
  result.channel = channel
  if (!hasPanel) result.reasons.push('air-temperature-used')

  // Gaps longer than the hold, and whether readings stopped before the end.
  const first = pts[0]!
  const last = pts[pts.length - 1]!
  result.lastReadingAtMs = last.t
  if (first.t - startMs > maxGap) result.gaps.push({ startMs, endMs: first.t })
  for (let i = 1; i < pts.length; i++) {
    const a = pts[i - 1]!.t
    const b = pts[i]!.t
    if (b - a > maxGap) result.gaps.push({ startMs: a + maxGap, endMs: b })
  }
  if (endMs - last.t > maxGap) {
    result.gaps.push({ startMs: last.t + maxGap, endMs })
    result.readingsStopped = true
  }
  if (result.gaps.length) result.reasons.push('data-gap')
  if (result.readingsStopped) result.reasons.push('readings-stopped')

  const sm = pts.map((_, i) => medianAround(pts, i))
  const startTemp = sm[0]!
  result.startTempC = startTemp
  let peakI = 0
  for (let i = 1; i < sm.length; i++) if (sm[i]! > sm[peakI]!) peakI = i
  result.peakC = sm[peakI]!
  result.peakAtMs = pts[peakI]!.t

  const heaterOnAt = heater.find((h) => h.on)?.t ?? null
  result.heaterOnAtMs = heaterOnAt
  const riseI = sm.findIndex((v) => v >= startTemp + riseK)
  const riseAt = riseI >= 0 ? pts[riseI]!.t : null
  let rampStart: number | null = heaterOnAt !== null && riseAt !== null ? Math.min(heaterOnAt, riseAt) : (heaterOnAt ?? riseAt)

  let target: number | null = isFiniteNumber(rawTarget) ? rawTarget : null
  if (target === null && result.peakC - startTemp >= minBakeRiseK) {
    target = result.peakC
    result.targetInferred = true
    result.reasons.push('target-inferred')
  }
  result.targetC = target

  const phases: PhaseSpan[] = []
  const push = (phase: PhaseName, a: number, b: number) => {
    if (b > a) phases.push({ phase, startMs: a, endMs: b })
  }

  const bandLow = target === null ? Number.POSITIVE_INFINITY : target - holdBandK
  const holdI = sm.findIndex((v, i) => v >= bandLow && (rampStart === null || pts[i]!.t >= rampStart || i === 0))
  if (holdI >= 0) {
    const holdStart = holdI === 0 ? startMs : pts[holdI]!.t
    if (rampStart === null || rampStart > holdStart) rampStart = holdStart
    let lastIn = holdI
    for (let i = sm.length - 1; i > holdI; i--) {
      if (sm[i]! >= bandLow) {
        lastIn = i
        break
      }
    }
    const after = lastIn + 1 < pts.length ? pts[lastIn + 1]!.t : Number.POSITIVE_INFINITY
    const holdEnd = Math.min(endMs, after, pts[lastIn]!.t + maxGap)
    // Dips: stays below the band inside the hold lasting at least minDipMs.
    for (let i = holdI + 1; i <= lastIn; i++) {
      if (sm[i]! >= bandLow) continue
      let j = i
      let minC = pts[i]!.v
      while (j <= lastIn && sm[j]! < bandLow) {
        minC = Math.min(minC, pts[j]!.v)
        j++
      }
      const dipStart = pts[i]!.t
      const dipEnd = pts[j]!.t // j ≤ lastIn: the reading back in the band
      if (dipEnd - dipStart >= minDipMs) result.dips.push({ startMs: dipStart, endMs: dipEnd, minC })
      i = j
    }
    if (result.dips.length) result.reasons.push('dip-during-hold')
    push('purge', startMs, rampStart)
    push('ramp', rampStart, holdStart)
    push('hold', holdStart, holdEnd)
    push('cool', holdEnd, endMs)
    result.reachedTarget = true
    result.reachedAtMs = holdStart
    result.holdMinutes = (holdEnd - holdStart) / 60_000
  } else {
    if (target !== null) result.reasons.push('target-not-reached')
    if (rampStart === null) {
      push('purge', startMs, endMs)
    } else {
      const rs = rampStart
      const heaterOff = heaterOnAt === null ? undefined : heater.find((h) => h.t > heaterOnAt && !h.on)
      const fell = sm.some((v, i) => i > peakI && v <= result.peakC! - coolDropK)
      const rampEnd = Math.max(rs, heaterOff ? heaterOff.t : fell ? result.peakAtMs! : endMs)
      push('purge', startMs, rs)
      push('ramp', rs, rampEnd)
      push('cool', rampEnd, endMs)
    }
  }
  result.phases = phases
  result.minutesAtOrAboveTarget = target === null ? 0 : heldMsAtOrAbove(pts, startMs, endMs, target, maxGap) / 60_000
  return result
}

/** The phase at an instant (e.g. now during a running bake), or null outside every phase. */
export function phaseAt(result: PhaseResult, atMs: number): PhaseName | null {
  for (const p of result.phases) if (atMs >= p.startMs && atMs < p.endMs) return p.phase
  const lastPhase = result.phases[result.phases.length - 1]
  return lastPhase && atMs === lastPhase.endMs ? lastPhase.phase : null
}
