import { createHash, randomBytes } from 'node:crypto'
import { hostname } from 'node:os'
import { resolve } from 'node:path'
import type { Kysely } from 'kysely'
import type pg from 'pg'
import type { ServerSettings } from '../config'
import type { Database } from '../db/database'
import type { Hasher } from '../domain/accounts'
import { findActiveDevice, setDeviceStatus } from '../repositories/booths'
import { startEmbeddedBroker, type DeviceIdentity, type EmbeddedBroker } from './broker'
import { BoothDirectory, type BoothEntry } from './directory'
import { LiveHub } from './live-hub'
import { dropExpiredPartitions, ensurePartitions } from './partitions'
import { IngestPipeline } from './pipeline'
import type { ReadingRow } from './reading-row'
import { RejectRecorder } from './rejects'
import { startSubscriber, type Subscriber } from './subscriber'
import { ReadingWriter } from './writer'
import type { BoothModeValue } from './wire'
import { loadLatestStates } from './latest'

// Wires broker, subscriber, pipeline, writer and live hub together for one app process.

export interface TelemetryHooks {
  /** Per accepted reading, on the hot path: O(1), never throws, never awaits. */
  onAccepted?(row: ReadingRow, booth: BoothEntry): void
  /** The booth controller reported a mode (…/mode topic). */
  onMode?(boothId: number, mode: BoothModeValue, tsMs: number): void
}

export interface Telemetry {
  directory: BoothDirectory
  live: LiveHub
  writer: ReadingWriter
  rejects: RejectRecorder
  pipeline: IngestPipeline
  broker: EmbeddedBroker | undefined
  subscriber: Subscriber
  mode: 'embedded' | 'external'
  brokerUrl: string
  subscriberUp: boolean
  subscriberDetail: string | undefined
  /** Drops cached device sign-ins (after a rotation or revocation). */
  forgetDevice(deviceId: string): void
  stop(): Promise<void>
}

let current: Telemetry | undefined
const hookSets: TelemetryHooks[] = []

export function telemetry(): Telemetry | undefined {
  return current
}

/**
 * Registers extra per-reading work (watches, bake detection), before or after start. Each call adds
 * one set; all sets run, in registration order. Returns the function that removes it.
 */
export function setTelemetryHooks(h: TelemetryHooks): () => void {
  hookSets.push(h)
  return () => {
    const i = hookSets.indexOf(h)
    if (i >= 0) hookSets.splice(i, 1)
  }
}

const HOUR = 3_600_000

export async function startTelemetry(db: Kysely<Database>, pool: pg.Pool, s: ServerSettings, hasher: Hasher): Promise<Telemetry> {
  const maxAgeMs = s.INGEST_MAX_AGE_HOURS * HOUR
  const now = Date.now()
  await ensurePartitions(pool, now - maxAgeMs - 24 * HOUR, now + 3 * 24 * HOUR)

  const directory = new BoothDirectory(db)
  await directory.load()
  const live = new LiveHub()
  for (const st of await loadLatestStates(db)) live.prime(st)

  const writer = new ReadingWriter({
    pool,
    spoolDir: resolve(s.INGEST_SPOOL_DIR),
    bufferMax: s.INGEST_BUFFER_MAX,
    onInsertError: async (e) => {
      // 23514: a row found no partition (the clock moved past what was made ahead).
      if ((e as { code?: string }).code === '23514') await ensurePartitions(pool, Date.now() - maxAgeMs, Date.now() + 3 * 24 * HOUR)
    },
  })
  writer.start()
  const rejects = new RejectRecorder(pool)
  rejects.start()

  const pipeline = new IngestPipeline(
    directory,
    live,
    rejects,
    {
      store: (row) => writer.add(row),
      onAccepted: (row, booth) => {
        for (const h of hookSets) h.onAccepted?.(row, booth)
      },
      onMode: (boothId, mode, tsMs) => {
        for (const h of hookSets) h.onMode?.(boothId, mode, tsMs)
        db.insertInto('booth_modes')
          .values({ booth_id: boothId, ts: new Date(tsMs), mode })
          .onConflict((oc) => oc.doNothing())
          .execute()
          .catch((e: unknown) => console.warn('[ingest] mode not stored:', e instanceof Error ? e.message : e))
      },
      onStatus: (_boothId, deviceId, status) => {
        if (deviceId) setDeviceStatus(db, deviceId, status, new Date()).catch(() => undefined)
      },
    },
    maxAgeMs,
  )

  // Device sign-in: scrypt is slow on purpose, so a good answer is remembered for a few minutes.
  const signIns = new Map<string, { id: DeviceIdentity; until: number }>()
  const checkDevice = async (username: string, password: string): Promise<DeviceIdentity | undefined> => {
    const key = `${username}\u0000${createHash('sha256').update(password).digest('hex')}`
    const hit = signIns.get(key)
    if (hit && hit.until > Date.now()) return hit.id
    const d = await findActiveDevice(db, username)
    if (!d || !(await hasher.verify(d.secret_hash, password))) return undefined
    const id = { deviceId: d.id, site: d.site_slug, booth: d.booth_slug }
    signIns.set(key, { id, until: Date.now() + 5 * 60_000 })
    return id
  }

  let broker: EmbeddedBroker | undefined
  let url: string
  let username = s.MQTT_USERNAME
  let password = s.MQTT_PASSWORD
  if (s.MQTT_URL) {
    url = s.MQTT_URL
  } else {
    username = 'boothbeat-app'
    password = randomBytes(24).toString('base64url')
    broker = await startEmbeddedBroker({
      host: s.MQTT_HOST,
      port: s.MQTT_PORT,
      app: { username, password },
      checkDevice,
      limits: { messagesPerSecond: s.MQTT_DEVICE_MSG_RATE, messageBurst: s.MQTT_DEVICE_MSG_BURST },
    })
    url = `mqtt://${s.MQTT_HOST}:${s.MQTT_PORT}`
  }

  const t: Telemetry = {
    directory,
    live,
    writer,
    rejects,
    pipeline,
    broker,
    mode: broker ? 'embedded' : 'external',
    brokerUrl: url,
    subscriberUp: false,
    subscriberDetail: 'connecting',
    subscriber: undefined as unknown as Subscriber,
    forgetDevice(deviceId) {
      for (const k of signIns.keys()) if (k.startsWith(`${deviceId}\u0000`)) signIns.delete(k)
    },
    async stop() {
      clearInterval(keeper)
      clearInterval(reloader)
      await t.subscriber.close().catch(() => undefined)
      await broker?.close().catch(() => undefined)
      await writer.stop()
      await rejects.stop()
      live.close()
      if (current === t) current = undefined
    },
  }
  t.subscriber = startSubscriber({
    url,
    username,
    password,
    clientId: s.MQTT_CLIENT_ID ?? `boothbeat-app-${hostname()}-${process.env.PORT ?? '3000'}`,
    protocolVersion: broker ? 4 : 5,
    storageQos: broker ? 0 : 1,
    sharedGroup: s.MQTT_URL ? s.MQTT_SHARED_GROUP : undefined,
    onReading: (topic, payload, route) => pipeline.handleReading(topic, payload, route),
    onControl: (topic, payload) => pipeline.handleControl(topic, payload),
    onState: (up, detail) => {
      t.subscriberUp = up
      t.subscriberDetail = detail
    },
  })

  const keeper = setInterval(() => {
    const n = Date.now()
    ensurePartitions(pool, n - HOUR, n + 3 * 24 * HOUR)
      .then(() => dropExpiredPartitions(pool, n, s.RETENTION_DAYS))
      .catch((e: unknown) => console.warn('[partitions]', e instanceof Error ? e.message : e))
  }, HOUR)
  const reloader = setInterval(() => directory.load().catch(() => undefined), 60_000)
  current = t
  return t
}

export function ingestHealth(): { up: boolean; body: Record<string, unknown> } {
  const t = current
  if (!t) return { up: false, body: { broker: { up: false, detail: 'starting' }, subscriber: { up: false }, ingestion: null } }
  const w = t.writer.stats()
  const c = t.pipeline.counters
  const brokerUp = t.mode === 'external' ? t.subscriberUp : Boolean(t.broker?.server.listening)
  return {
    up: brokerUp && t.subscriberUp,
    body: {
      broker: { mode: t.mode, url: t.brokerUrl, up: brokerUp, clients: t.broker?.connectedClients() },
      subscriber: { up: t.subscriberUp, detail: t.subscriberDetail },
      ingestion: {
        received: c.received,
        accepted: c.accepted,
        rejected: c.rejected,
        rejectedByReason: t.rejects.totalsByReason(),
        stored: w.stored,
        duplicates: w.duplicates,
        buffered: w.buffered,
        spooled: w.spooled,
        backlog: w.buffered + w.spooled,
        lagMs: w.lagMs,
        databaseWritable: w.databaseUp,
        lastError: w.lastError,
        lastReadingAt: c.lastReadingAtMs ? new Date(c.lastReadingAtMs).toISOString() : null,
      },
    },
  }
}
