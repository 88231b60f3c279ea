// Pot life of a mixed product since mixing, scaled on booth air temperature with the Q10 rule:
//   used = ∫ Q10^((T_air − Tref)/10) dt / potLifeMinutes, expired when used ≥ 1.
// Source: Q10 rule of thumb (see q10.ts); pot life at Tref from the TDS.
// Unlike flash and cure (where a gap must never create progress), a gap must never make a mix look fresher:
// by default time without readings counts at max(1, last known rate) and the result is flagged.

import { isFiniteNumber, isRecord, optionalNumber } from './guards'
import { DEFAULT_Q10, DEFAULT_REF_TEMP_C, Q10_MAX_C, Q10_MIN_C, q10Factor } from './q10'
import type { EstimateReason } from './reasons'
import type { HeldValues, HoldOptions, Sample } from './samples'
import { holdOptionsOf, integrateRate, projectCrossing } from './samples'

export interface PotLifeSpec {
  /** Pot life at refTempC, minutes, > 0. */
  potLifeMinutes: number
  /** °C, −40…60. Default 20. */
  refTempC?: number
  /** ≥ 1. Default 2 (common practice). */
  q10?: number
}

export interface PotLifeOptions extends HoldOptions {
  /** 'conservative' (default): gaps count at max(1, last rate). 'ignore': gaps count nothing (as flash does). */
  gapPolicy?: 'conservative' | 'ignore'
}

export interface PotLifeResult {
  /** Fraction of pot life used (dimensionless, ≥ 1 = expired); NaN on invalid input. */
  usedFraction: number
  expired: boolean
  /** Exact expiry if expired, else projected at the current rate (never in the past); null if not projectable. */
  expiresAtMs: number | null
  /** Current rate multiplier; NaN when no usable reading now. */
  rateNow: number
  uncertain: boolean
  reasons: EstimateReason[]
}

function invalidPotLife(): PotLifeResult {
  return {
    usedFraction: Number.NaN,
    expired: false,
    expiresAtMs: null,
    rateNow: Number.NaN,
    uncertain: true,
    reasons: ['invalid-input'],
  }
}

/**
 * Pot life used between mixedAtMs and nowMs (epoch ms, now ≥ mixed), on booth air temperature.
 * Invalid input → NaN / null fields. Never throws.
 */
export function potLife(
  spec: PotLifeSpec,
  samples: readonly Sample[],
  mixedAtMs: number,
  nowMs: number,
  options?: PotLifeOptions,
): PotLifeResult {
  if (!isRecord(spec)) return invalidPotLife()
  const minutes = spec.potLifeMinutes
  const refTempC = optionalNumber(spec.refTempC, DEFAULT_REF_TEMP_C, (v) => v >= Q10_MIN_C && v <= Q10_MAX_C)
  const q10 = optionalNumber(spec.q10, DEFAULT_Q10, (v) => v >= 1)
  const hold = holdOptionsOf(options)
  if (!isFiniteNumber(minutes) || !(minutes > 0) || Number.isNaN(refTempC) || Number.isNaN(q10) || hold === null) {
    return invalidPotLife()
  }
  const policy = isRecord(options) && options.gapPolicy !== undefined ? options.gapPolicy : 'conservative'
  if (policy !== 'conservative' && policy !== 'ignore') return invalidPotLife()
  const gapRate = policy === 'conservative' ? (last: number | null) => Math.max(1, last ?? 1) : undefined

  const rate = (v: HeldValues): number => (v.airTempC === null ? Number.NaN : q10Factor(v.airTempC, refTempC, q10))
  const run = integrateRate(samples, mixedAtMs, nowMs, rate, { ...hold, targets: [minutes], gapRate })
  if (!run.valid) return invalidPotLife()

  const projectionRate = Number.isNaN(run.rateNow) && gapRate ? gapRate(run.lastRate) : run.rateNow
  const reasons: EstimateReason[] = []
  if (run.uncoveredMs > 0) reasons.push(policy === 'conservative' ? 'gap-counted-conservatively' : 'data-gap')
  if (Number.isNaN(run.rateNow)) reasons.push('no-current-reading')
  const crossing = run.crossings[0] ?? null
  return {
    usedFraction: run.integral / minutes,
    expired: crossing !== null,
    expiresAtMs: projectCrossing(crossing, nowMs, minutes - run.integral, projectionRate),
    rateNow: run.rateNow,
    uncertain: run.uncertain,
    reasons,
  }
}
