// Input guards shared by the engine: every public function validates with these and returns NaN, never throws.

export function isFiniteNumber(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x)
}

/** An optional numeric field: undefined → fallback; otherwise it must be finite and pass `ok`, else NaN. */
export function optionalNumber(x: unknown, fallback: number, ok: (v: number) => boolean): number {
  if (x === undefined) return fallback
  return isFiniteNumber(x) && typeof ok === 'function' && ok(x) === true ? x : Number.NaN
}

/** A non-null, non-array object whose fields may be read. */
export function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x)
}
