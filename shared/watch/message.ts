// Plain-language alert messages, in the channel's unit. Built only when an event happens, never per reading.

import type { BakeEvent } from './bake'
import type { CusumEvent } from './cusum'
import { CHANNEL_INFO, type BoothMode, type WatchChannel } from './reading'
import { WATCH_KIND_LABELS, type WatchKind } from './rules'
import type { SilenceEvent } from './silence'
import type { ThresholdEvent } from './threshold'

export function formatDuration(ms: number): string {
  if (!Number.isFinite(ms) || ms < 0) return '?'
  const s = Math.round(ms / 1000)
  if (s < 60) return `${s} s`
  const m = Math.floor(s / 60)
  if (m < 60) return s % 60 === 0 ? `${m} min` : `${m} min ${s % 60} s`
  const h = Math.floor(m / 60)
  return m % 60 === 0 ? `${h} h` : `${h} h ${m % 60} min`
}

function fmt(channel: WatchChannel, v: number | null): string {
  if (v === null || !Number.isFinite(v)) return 'no data'
  const { unit, digits } = CHANNEL_INFO[channel]
  return `${v.toFixed(digits)} ${unit}`
}

export function thresholdMessage(
  kind: WatchKind,
  channel: WatchChannel,
  ev: ThresholdEvent,
  mode: BoothMode | null,
): string {
  const title = WATCH_KIND_LABELS[kind]
  const what = CHANNEL_INFO[channel].label
  const dir = ev.side === 'high' ? 'above' : 'below'
  if (ev.type === 'open') {
    return `${title}: ${what} ${fmt(channel, ev.value)}, ${dir} the ${fmt(channel, ev.limit)} limit for ${formatDuration(ev.at - ev.since)}`
  }
  const worst = `worst ${fmt(channel, ev.peak)}, open ${formatDuration(ev.at - ev.since)}`
  if (ev.value === null) return `${title} ended: not watched in ${mode ?? 'unknown'} mode (${worst})`
  return `${title} cleared: ${what} back to ${fmt(channel, ev.value)} (${worst})`
}

export function silenceMessage(channel: WatchChannel | 'any', ev: SilenceEvent): string {
  const what = channel === 'any' ? 'No sensor data' : `No ${CHANNEL_INFO[channel].label.toLowerCase()} data`
  if (ev.type === 'open') return `${WATCH_KIND_LABELS.sensor_silence}: ${what} for ${formatDuration(ev.value)}`
  return `${WATCH_KIND_LABELS.sensor_silence} cleared: data back after a ${formatDuration(ev.value)} gap`
}

export function bakeMessage(channel: WatchChannel, ev: BakeEvent): string {
  const title = WATCH_KIND_LABELS.bake_not_reaching_temp
  const what = CHANNEL_INFO[channel].label.toLowerCase()
  const after = formatDuration(ev.at - ev.since)
  if (ev.type === 'open') {
    return `${title}: ${what} at most ${fmt(channel, ev.peak)} of the ${fmt(channel, ev.limit)} target after ${after}`
  }
  if (ev.value === null) return `${title} ended: bake stopped at most at ${fmt(channel, ev.peak)} after ${after}`
  return `${title} cleared: ${what} reached ${fmt(channel, ev.value)} after ${after}`
}

export function cusumMessage(channel: WatchChannel, ev: CusumEvent, target: number, subgroupMs: number): string {
  const title = WATCH_KIND_LABELS.rh_cusum
  const dir = ev.side === 'high' ? 'up' : 'down'
  const mean = `${formatDuration(subgroupMs)} average`
  if (ev.type === 'open') {
    return `${title}: ${CHANNEL_INFO[channel].label.toLowerCase()} drifting ${dir}, ${mean} ${fmt(channel, ev.value)} against a ${fmt(channel, target)} target`
  }
  if (ev.value === null) return `${title} ended: not watched in this mode (most extreme ${mean} ${fmt(channel, ev.peak)})`
  return `${title} cleared: ${mean} back near target at ${fmt(channel, ev.value)} (most extreme ${fmt(channel, ev.peak)})`
}
