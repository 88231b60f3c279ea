// Least-squares line through (time, value) points and when it crosses a limit — for the filter pressure-drop
// trend ("at this rate the exhaust filter reaches 250 Pa in 3 days"). Ordinary least squares, textbook formulas.

export interface TrendPoint {
  /** Epoch ms. */
  t: number
  value: number
}

export interface LinearTrend {
  valid: boolean
  n: number
  /** Change per day, in the values' unit. */
  slopePerDay: number
  /** Fitted value at `atMs`. */
  valueAt(atMs: number): number
  /** Spread of the points in time, days. */
  spanDays: number
  /** Coefficient of determination, 0…1 (NaN when all values are equal). */
  r2: number
}

const DAY_MS = 86_400_000

export function linearTrend(points: readonly TrendPoint[]): LinearTrend {
  const pts = (Array.isArray(points) ? points : []).filter((p) => Number.isFinite(p?.t) && Number.isFinite(p?.value))
  const n = pts.length
  const none: LinearTrend = { valid: false, n, slopePerDay: Number.NaN, valueAt: () => Number.NaN, spanDays: 0, r2: Number.NaN }
  if (n < 2) return none
  // Centre the times (days) so the sums stay well conditioned with epoch milliseconds.
  const t0 = pts[0]!.t
  let sx = 0
  let sy = 0
  for (const p of pts) {
    sx += (p.t - t0) / DAY_MS
    sy += p.value
  }
  const mx = sx / n
  const my = sy / n
  let sxx = 0
  let sxy = 0
  let syy = 0
  let minT = Number.POSITIVE_INFINITY
  let maxT = Number.NEGATIVE_INFINITY
  for (const p of pts) {
    const dx = (p.t - t0) / DAY_MS - mx
    const dy = p.value - my
    sxx += dx * dx
    sxy += dx * dy
    syy += dy * dy
    minT = Math.min(minT, p.t)
    maxT = Math.max(maxT, p.t)
  }
  if (sxx === 0) return none
  const slope = sxy / sxx
  return {
    valid: true,
    n,
    slopePerDay: slope,
    valueAt: (atMs: number) => my + slope * ((atMs - t0) / DAY_MS - mx),
    spanDays: (maxT - minT) / DAY_MS,
    r2: syy === 0 ? Number.NaN : (sxy * sxy) / (sxx * syy),
  }
}

/**
 * Days from `nowMs` until the fitted line reaches `limit`: 0 when it is there already, null when it is not
 * rising (or the trend is invalid).
 */
export function daysToLimit(trend: LinearTrend, nowMs: number, limit: number): number | null {
  if (!trend.valid || !Number.isFinite(limit) || !Number.isFinite(nowMs)) return null
  const now = trend.valueAt(nowMs)
  if (now >= limit) return 0
  if (!(trend.slopePerDay > 0)) return null
  return (limit - now) / trend.slopePerDay
}
