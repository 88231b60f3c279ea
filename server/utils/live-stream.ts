import type { H3Event } from 'h3'
import { createError, createEventStream } from 'h3'
import { STALE_AFTER_MS } from '../domain/booths'
import type { LiveBoothState } from '../telemetry/live-hub'
import { telemetry } from '../telemetry/runtime'

function withStaleness(s: LiveBoothState) {
  const received = s.reading ? Date.parse(s.reading.receivedAt) : 0
  return { ...s, stale: !s.reading || Date.now() - received > STALE_AFTER_MS, serverTime: new Date().toISOString() }
}

/**
 * Server-Sent Events of live booth state: the current state at once, then every update (at most
 * twice a second per booth), and a heartbeat every 10 s that also refreshes staleness.
 */
export function sendLiveStream(event: H3Event, boothId: number | null) {
  const t = telemetry()
  if (!t) throw createError({ statusCode: 503, message: 'Telemetry is starting' })
  const stream = createEventStream(event)
  const send = (s: LiveBoothState) => void stream.push({ event: 'booth', data: JSON.stringify(withStaleness(s)) })
  const initial = boothId === null ? t.live.all() : [t.live.get(boothId)].filter((s): s is LiveBoothState => !!s)
  const unsubscribe = t.live.subscribe(boothId, send)
  const heartbeat = setInterval(() => {
    const states = boothId === null ? t.live.all() : [t.live.get(boothId)].filter((s): s is LiveBoothState => !!s)
    void stream.push({ event: 'heartbeat', data: JSON.stringify({ serverTime: new Date().toISOString(), stale: states.filter((s) => withStaleness(s).stale).map((s) => s.boothId) }) })
  }, 10_000)
  stream.onClosed(async () => {
    clearInterval(heartbeat)
    unsubscribe()
    await stream.close()
  })
  setTimeout(() => initial.forEach(send), 0)
  return stream.send()
}
