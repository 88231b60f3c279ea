// Revision bodies for the spec tests (not a test file). Invented values within the usual ranges.
import type { SpecRevisionFields } from '#shared/schemas/spec'
import { completeRevision } from '#shared/schemas/spec'

/** A complete, valid solvent-borne 2K body as a form would send it (°C). */
export function goodBody(): Record<string, unknown> {
  return {
    refTempC: 20,
    flashMinMinutes: 5,
    flashMaxMinutes: 10,
    flashBeforeNextMinutes: 15,
    recoatWindowMinutes: 60,
    coats: 2,
    potLifeMinutes: 90,
    mixRatio: '4:1:1',
    reducerBands: [
      { fromC: null, toC: 18, grade: 'Fast' },
      { fromC: 18, toC: 25, grade: 'Standard' },
      { fromC: 25, toC: null, grade: 'Slow' },
    ],
    minAirTempC: 15,
    maxAirTempC: 35,
    minRhPct: 20,
    maxRhPct: 80,
    dustFreeMinutes: 15,
    handleMinutes: 120,
    sandPolishMinutes: 960,
    bakeSchedules: [{ objectTempC: 60, minutes: 30 }],
    minCureTempC: 10,
    q10: 2,
  }
}

export function fields(over: Partial<SpecRevisionFields> = {}): SpecRevisionFields {
  return completeRevision({ refTempC: 20, flashMinMinutes: 5, flashMaxMinutes: 10, flashBeforeNextMinutes: 15, coats: 2, ...over })
}
