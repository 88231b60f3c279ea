// Temperatures of a revision in another unit (for forms that edit in °F). Pure.
import { cToF, fToC } from '../cure/units'
import type { TemperatureUnit } from '../schemas/spec'

/** The temperature-carrying fields of a revision (all absolute temperatures, none a difference). */
export const TEMPERATURE_FIELDS = ['refTempC', 'minAirTempC', 'maxAirTempC', 'minCureTempC'] as const

type MaybeNum = number | null | undefined

/** The revision-like shape this works on: every field optional, numbers possibly missing (form state). */
export interface RevisionTemps {
  refTempC?: MaybeNum
  minAirTempC?: MaybeNum
  maxAirTempC?: MaybeNum
  minCureTempC?: MaybeNum
  reducerBands?: { fromC?: MaybeNum; toC?: MaybeNum; grade?: string }[] | null
  bakeSchedules?: { objectTempC?: MaybeNum; minutes?: MaybeNum }[] | null
  flashTable?: { tempC?: MaybeNum; minutes?: MaybeNum }[] | null
}

/** A copy with every temperature passed through fn (missing values stay missing). */
export function mapTemperatures<T extends RevisionTemps>(f: T, fn: (v: number) => number): T {
  const m = (v: MaybeNum): MaybeNum => (typeof v === 'number' && Number.isFinite(v) ? fn(v) : v)
  const out: T = { ...f }
  for (const k of TEMPERATURE_FIELDS) if (k in f) (out as RevisionTemps)[k] = m(f[k])
  if (f.reducerBands) out.reducerBands = f.reducerBands.map((b) => ({ ...b, fromC: m(b.fromC), toC: m(b.toC) }))
  if (f.bakeSchedules) out.bakeSchedules = f.bakeSchedules.map((b) => ({ ...b, objectTempC: m(b.objectTempC) }))
  if (f.flashTable) out.flashTable = f.flashTable.map((r) => ({ ...r, tempC: m(r.tempC) }))
  return out
}

/** Rounds to `decimals` places (display only: a °F value of a stored °C is rarely a whole number). */
export function roundTo(v: number, decimals = 1): number {
  const k = 10 ** decimals
  return Math.round(v * k) / k
}

/** Converts the temperatures of revision-like data between units; same unit → a plain copy. */
export function convertTemperatures<T extends RevisionTemps>(f: T, from: TemperatureUnit, to: TemperatureUnit, decimals?: number): T {
  if (from === to) return mapTemperatures(f, (v) => v)
  const conv = from === 'C' ? cToF : fToC
  return mapTemperatures(f, (v) => (decimals === undefined ? conv(v) : roundTo(conv(v), decimals)))
}
