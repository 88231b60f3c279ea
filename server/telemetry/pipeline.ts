import { dewPointC } from '#shared/cure/psychrometrics'
import type { BoothDirectory, BoothEntry } from './directory'
import type { LiveHub } from './live-hub'
import type { ReadingRow } from './reading-row'
import type { RejectRecorder } from './rejects'
import { parseMode, parseTopic, validateReading, type BoothModeValue } from './wire'

// The ingest hot path: topic → booth (in memory) → validation → row with dew point → writer and live
// screens. No query per message; everything that is refused is counted, and nothing throws.

export interface PipelineSinks {
  store(row: ReadingRow): void
  /** Extra per-reading work on accepted rows (watches, bake detection); O(1), must not throw. */
  onAccepted?(row: ReadingRow, booth: BoothEntry): void
  onMode?(boothId: number, mode: BoothModeValue, tsMs: number): void
  onStatus?(boothId: number, deviceId: string | undefined, status: string): void
}

export interface PipelineCounters {
  received: number
  accepted: number
  rejected: number
  lastReadingAtMs: number
}

const round = (v: number | undefined, digits: number) =>
  v === undefined ? null : Math.round(v * 10 ** digits) / 10 ** digits

export class IngestPipeline {
  readonly counters: PipelineCounters = { received: 0, accepted: 0, rejected: 0, lastReadingAtMs: 0 }

  constructor(
    private readonly directory: BoothDirectory,
    private readonly live: LiveHub,
    private readonly rejects: RejectRecorder,
    private readonly sinks: PipelineSinks,
    private readonly maxAgeMs: number,
  ) {}

  handleReading(topic: string, payload: Buffer, route: { store: boolean; live: boolean }): void {
    const now = Date.now()
    if (route.store) this.counters.received++
    const t = parseTopic(topic)
    if (!t || t.kind !== 'reading') {
      if (route.store) this.refuse('unknown', null, topic, 'bad_topic', 'not a reading topic', payload)
      return
    }
    const booth = this.directory.lookup(t.site, t.booth)
    if (!booth) {
      this.directory.maybeReload()
      if (route.store) this.refuse(`${t.site}/${t.booth}`, null, topic, 'unknown_booth', `no booth ${t.site}/${t.booth}`, payload)
      return
    }
    const v = validateReading(payload, now, this.maxAgeMs)
    if (!v.ok) {
      if (route.store) this.refuse(String(booth.id), booth.id, topic, v.reason, v.detail, payload)
      return
    }
    const r = v.reading
    const air = r.airTempC ?? null
    const rh = r.rhPct ?? null
    const dp = air !== null && rh !== null && rh > 0 ? dewPointC(air, rh) : NaN
    const row: ReadingRow = {
      boothId: booth.id,
      tsMs: r.tsMs,
      receivedMs: now,
      deviceId: booth.deviceId ?? `${t.site}-${t.booth}`,
      seq: r.seq ?? null,
      airTempC: air,
      rhPct: rh,
      panelTempC: r.panelTempC ?? null,
      airflowMps: r.airflowMps ?? null,
      boothDpPa: r.boothDpPa ?? null,
      intakeFilterDpPa: r.intakeFilterDpPa ?? null,
      exhaustFilterDpPa: r.exhaustFilterDpPa ?? null,
      heaterOn: r.heaterOn ?? null,
      dewPointC: Number.isFinite(dp) ? round(dp, 2) : null,
    }
    // Screens and watches follow the live route: with a shared subscription every instance still
    // sees every reading there, while storage gets only this instance's share.
    if (route.live) {
      this.live.reading(row)
      try {
        this.sinks.onAccepted?.(row, booth)
      } catch (e) {
        console.warn('[ingest] onAccepted failed:', e)
      }
    }
    if (!route.store) return
    this.counters.accepted++
    this.counters.lastReadingAtMs = now
    this.sinks.store(row)
  }

  handleControl(topic: string, payload: Buffer): void {
    const t = parseTopic(topic)
    if (!t) return
    const booth = this.directory.lookup(t.site, t.booth)
    if (!booth) return this.directory.maybeReload()
    if (t.kind === 'mode') {
      const m = parseMode(payload, Date.now())
      if (!m) return this.refuse(String(booth.id), booth.id, topic, 'wrong_types', 'mode must be idle, spray, flash, bake or cool', payload)
      this.live.mode(booth.id, m.mode, new Date(m.tsMs).toISOString())
      this.sinks.onMode?.(booth.id, m.mode, m.tsMs)
    } else if (t.kind === 'status') {
      const status = payload.toString('utf8').trim().slice(0, 20) === 'online' ? 'online' : 'offline'
      this.live.deviceStatus(booth.id, status)
      this.sinks.onStatus?.(booth.id, booth.deviceId, status)
    }
  }

  private refuse(boothKey: string, boothId: number | null, topic: string, reason: Parameters<RejectRecorder['record']>[3], detail: string, payload: Buffer) {
    this.counters.rejected++
    this.rejects.record(boothKey, boothId, topic, reason, detail, payload)
  }
}
