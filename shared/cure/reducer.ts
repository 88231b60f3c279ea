// Reducer (thinner) advice: the TDS maps booth temperature bands to a reducer grade (e.g. fast / medium / slow).
// Source: the data sheet itself; this file only looks the temperature up.
// Bands are half-open, [minC, maxC): a temperature exactly on a shared edge belongs to the warmer band.
// Use −Infinity / Infinity for open-ended first / last bands. Overlapping or malformed bands give no advice.

import { isFiniteNumber, isRecord } from './guards'

export interface ReducerBand {
  /** Lower edge, °C, inclusive (may be −Infinity). */
  minC: number
  /** Upper edge, °C, exclusive (may be Infinity); > minC. */
  maxC: number
  /** Reducer grade as the TDS names it. */
  grade: string
}

function validBands(bands: unknown): ReducerBand[] | null {
  if (!Array.isArray(bands) || bands.length === 0) return null
  const out: ReducerBand[] = []
  for (const b of bands as unknown[]) {
    if (!isRecord(b) || typeof b.minC !== 'number' || typeof b.maxC !== 'number') return null
    if (typeof b.grade !== 'string' || b.grade.trim() === '') return null
    // NaN fails `<`; an edge of −Infinity / Infinity is allowed for open-ended bands.
    if (!(b.minC < b.maxC) || b.minC === Number.POSITIVE_INFINITY || b.maxC === Number.NEGATIVE_INFINITY) return null
    out.push({ minC: b.minC, maxC: b.maxC, grade: b.grade })
  }
  out.sort((x, y) => x.minC - y.minC)
  for (let i = 1; i < out.length; i++) {
    if ((out[i] as ReducerBand).minC < (out[i - 1] as ReducerBand).maxC) return null // overlap
  }
  return out
}

/**
 * Advised reducer grade at booth temperature tC (°C, finite), or null when no band covers it or the bands are
 * malformed / overlapping. Bands are [minC, maxC).
 */
export function reducerAdvice(bands: readonly ReducerBand[], tempC: number): string | null {
  const rows = validBands(bands)
  if (rows === null || !isFiniteNumber(tempC)) return null
  for (const b of rows) if (tempC >= b.minC && tempC < b.maxC) return b.grade
  return null
}

export type ReducerCheckStatus = 'match' | 'mismatch' | 'no-advice' | 'no-grade-logged'

export interface ReducerCheck {
  /** True only when a grade was logged and it is the advised one. */
  ok: boolean
  status: ReducerCheckStatus
  advised: string | null
  used: string | null
  message: string
}

function sameGrade(a: string, b: string): boolean {
  return a.trim().toLowerCase() === b.trim().toLowerCase()
}

/** Compares the grade logged on the mix with the advice at tempC (grades compared trimmed, case-insensitive). */
export function reducerCheck(bands: readonly ReducerBand[], tempC: number, usedGrade: string | null): ReducerCheck {
  const advised = reducerAdvice(bands, tempC)
  const used = typeof usedGrade === 'string' && usedGrade.trim() !== '' ? usedGrade.trim() : null
  if (advised === null) {
    return { ok: false, status: 'no-advice', advised, used, message: 'No reducer band of the data sheet covers this temperature.' }
  }
  if (used === null) {
    return { ok: false, status: 'no-grade-logged', advised, used, message: `No reducer logged; the data sheet advises ${advised}.` }
  }
  if (sameGrade(advised, used)) {
    return { ok: true, status: 'match', advised, used, message: `Reducer ${used} matches the data sheet.` }
  }
  return {
    ok: false,
    status: 'mismatch',
    advised,
    used,
    message: `Reducer ${used} logged; the data sheet advises ${advised} at this temperature.`,
  }
}
