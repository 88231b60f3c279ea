// The intake-air humidity trend on top of the daily swing: a steady creep, or weather that comes and goes.

export interface DriftEpisodes {
  /** Largest excursion, percentage points (its sign follows the rate). */
  peakPct: number
  /** Time at the peak before the humidity falls back, simulated hours. */
  holdHours: number
  /** Time back at the usual level before the next episode, simulated hours. */
  restHours: number
}

/**
 * Trend in percentage points after `hours` of simulated time, for a rate in points per simulated hour.
 * Without episodes the trend grows linearly for ever; with them it is a trapezoid: rise at the rate to the peak,
 * hold, fall back at the same rate, rest, repeat. The first episode starts at once.
 */
export function driftTrendPct(hours: number, ratePctPerHour: number, episodes?: DriftEpisodes): number {
  if (!episodes || ratePctPerHour === 0) return ratePctPerHour * hours
  const peak = Math.abs(episodes.peakPct)
  const rate = Math.abs(ratePctPerHour)
  const rampH = peak / rate
  const holdH = Math.max(0, episodes.holdHours)
  const restH = Math.max(0, episodes.restHours)
  const cycleH = 2 * rampH + holdH + restH
  if (!(cycleH > 0)) return 0
  const t = ((hours % cycleH) + cycleH) % cycleH
  let level: number
  if (t < rampH) level = t * rate
  else if (t < rampH + holdH) level = peak
  else if (t < 2 * rampH + holdH) level = peak - (t - rampH - holdH) * rate
  else level = 0
  return Math.sign(ratePctPerHour) * level
}
