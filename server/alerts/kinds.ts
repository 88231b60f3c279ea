// What an alert kind means to people: its title, how urgent it is, its unit, and the safety words that go with it.
// Pure (no Nuxt, no database) so the mail renderer, the runtime and the tests share it.

import { CHANNEL_INFO, WATCH_CHANNELS, WATCH_KIND_LABELS, type WatchChannel, type WatchKind } from '#shared/watch'
import type { AlertSeverity } from '../db/tables/alerts'

export const APPLICATION_WINDOW_KIND = 'application_window'
export type AlertKind = WatchKind | typeof APPLICATION_WINDOW_KIND

export const ALERT_KIND_LABELS: Record<AlertKind, string> = {
  ...WATCH_KIND_LABELS,
  [APPLICATION_WINDOW_KIND]: "Outside the product's application window",
}

export function kindLabel(kind: string): string {
  return (ALERT_KIND_LABELS as Record<string, string>)[kind] ?? kind
}

// Critical: people are spraying into a condition that spoils the finish or endangers them right now; these are
// e-mailed even in quiet hours. Everything else waits for the morning.
const CRITICAL = new Set<string>(['dew_point_margin', 'airflow_min_in_spray', APPLICATION_WINDOW_KIND])

export function severityOf(kind: string): AlertSeverity {
  return CRITICAL.has(kind) ? 'critical' : 'warning'
}

const HOLD = 'Hold spraying until the booth is back in spec; follow the data sheet.'

/** Plain safety words shown with the alert (screen and e-mail). */
export const SAFETY_WORDS: Record<AlertKind, string> = {
  rh_band: `Humidity changes flash-off and can cause blushing or dry spray. ${HOLD}`,
  rh_cusum: `Humidity is drifting away from its usual level: check the air supply before it leaves the range. ${HOLD}`,
  dew_point_margin: `Condensation risk on the panel. ${HOLD}`,
  air_temp_band: `Flash-off and cure times change outside this range. ${HOLD}`,
  airflow_min_in_spray:
    'Low airflow leaves overspray in the air: stop spraying, keep your respirator on, and check the fans and filters.',
  booth_pressure_band: 'Check the doors, fans and filters: a wrong balance draws in dust or pushes overspray out of the booth.',
  filter_dp_max: 'Plan a filter change: airflow drops as the filter loads. Follow the filter maker’s change limit.',
  sensor_silence: 'The booth is not being watched: check the sensor and its network before relying on the screen.',
  bake_not_reaching_temp:
    'The cure may be incomplete: check the heater, and do not handle or polish the panel until the cure is confirmed against the data sheet.',
  [APPLICATION_WINDOW_KIND]: `The conditions are outside the limits of the product being applied. ${HOLD}`,
}

export function safetyWords(kind: string): string | null {
  return (SAFETY_WORDS as Record<string, string>)[kind] ?? null
}

export function isWatchChannel(v: unknown): v is WatchChannel {
  return typeof v === 'string' && (WATCH_CHANNELS as readonly string[]).includes(v)
}

/** Unit stored with an alert: the channel's unit, or seconds for a sensor silence. */
export function unitOf(kind: string, channel: string | null): string | null {
  if (kind === 'sensor_silence') return 's'
  return isWatchChannel(channel) ? CHANNEL_INFO[channel].unit : null
}

export function digitsOf(channel: string | null): number {
  return isWatchChannel(channel) ? CHANNEL_INFO[channel].digits : 1
}

/** "72.3 %", "0.21 m/s", "1 min 15 s"; "no data" for a missing value. */
export function formatAlertValue(kind: string, channel: string | null, v: number | null | undefined): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) return 'no data'
  if (kind === 'sensor_silence') return formatSeconds(v)
  const unit = unitOf(kind, channel)
  return `${v.toFixed(digitsOf(channel))}${unit ? ` ${unit}` : ''}`
}

export function formatSeconds(s: number): string {
  if (!Number.isFinite(s) || s < 0) return '?'
  const r = Math.round(s)
  if (r < 60) return `${r} s`
  const m = Math.floor(r / 60)
  if (m < 60) return r % 60 ? `${m} min ${r % 60} s` : `${m} min`
  const h = Math.floor(m / 60)
  return m % 60 ? `${h} h ${m % 60} min` : `${h} h`
}
