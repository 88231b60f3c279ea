// MQTT side of the simulator: one mqtt.js client per booth, publishing the booth model's messages with QoS 1.
// Messages published while the client is offline are kept in mqtt.js's outgoing store and sent after the
// (re)connect; unacknowledged QoS 1 messages are resent by mqtt.js after a reconnect.

import { connect, type IClientOptions, type MqttClient } from 'mqtt'
import { boothSpecs, DEMO_SITE, kindForBooth, type BoothKind, type BoothSpec } from './booths'
import { createBoothModel, type BoothModel, type BoothModelOptions, type Phase } from './model'
import { hashSeed, type SeedInput } from './prng'
import {
  boothTopics,
  deviceIdFor,
  modePayload,
  STATUS_OFFLINE,
  STATUS_ONLINE,
  type BoothTopics,
  type Mode,
  type Reading,
} from './wire'

export const DEFAULT_MQTT_URL = 'mqtt://127.0.0.1:1883'

export interface SimulatorOptions {
  /** Number of booths (demo booths first, then `sim-booth-<i>`), or explicit booth slugs. Default 3. */
  booths?: number | readonly string[]
  /** Time compression of the cycle and drift dynamics. Default 1. */
  speed?: number
  /** Seed of the run. Default: derived from the start time (printed at start). */
  seed?: SeedInput
  /** Fraction (0…1) of deliberately broken messages. Default 0. */
  faults?: number
  /** Broker URL. Default: MQTT_URL, else mqtt://127.0.0.1:1883. */
  url?: string
  /** Readings per second per booth. Default 1. */
  rateHz?: number
  /** Stop producing after this many messages per booth (faulty ones included); `done` then resolves. */
  count?: number
  /** Site slug. Default `larkspur`. */
  site?: string
  /** Device password. Default: DEMO_DEVICE_PASSWORD. */
  password?: string
  /** Intake RH trend, percentage points per simulated hour (see BoothModelOptions). Default 0. */
  humidityDriftPct?: number
  /** Sensor dropouts and message gaps. Default true. */
  dropouts?: boolean
  /** Wall-clock start (ms since epoch). Default Date.now(). */
  startMs?: number
  /** MQTT protocol version. Default 4 (3.1.1; the embedded broker speaks 3.1.1 only). */
  protocolVersion?: 4 | 5
  /**
   * Log sink. Levels: `info` start lines, summaries, reconnects; `warn` connection and publish problems;
   * `result` the final line of stop(). Default: silent.
   */
  log?: (line: string, level: LogLevel) => void
  /** Summary period, ms; 0 turns it off. Default 10 000 when `log` is given. */
  summaryIntervalMs?: number
  /** How long stop() waits for outstanding acknowledgements, ms. Default 5000. */
  drainTimeoutMs?: number
  /** Messages awaiting PUBACK per booth beyond which new readings are dropped (counted). Default 100 000. */
  maxPendingPerBooth?: number
  /** Extra model options applied to every booth (tests). */
  model?: Partial<Omit<BoothModelOptions, 'booth' | 'seed' | 'speed' | 'startMs' | 'faults'>>
}

export type LogLevel = 'info' | 'warn' | 'result'

export interface BoothInfo {
  booth: string
  kind: BoothKind
  deviceId: string
  topics: BoothTopics
  skewMs: number
}

export interface BoothStats extends BoothInfo {
  connected: boolean
  mode: Mode
  phase: Phase
  /** Messages handed to the MQTT client (readings incl. faulty ones; mode and status not counted). */
  generated: number
  /** Of those, acknowledged by the broker (PUBACK). */
  acked: number
  /** Awaiting PUBACK (includes messages queued while offline). */
  pending: number
  failed: number
  faults: number
  /** Ticks without a message (simulated dropout gaps). */
  gaps: number
  /** Readings not produced because too many were pending, or ticks skipped after the event loop fell behind. */
  dropped: number
  modeChanges: number
  last: Reading | undefined
}

export interface SimulatorStats {
  url: string
  site: string
  seed: SeedInput
  speed: number
  rateHz: number
  faults: number
  startedAtMs: number
  uptimeMs: number
  /** True once every booth has produced `count` messages (never without `count`). */
  complete: boolean
  stopped: boolean
  booths: BoothStats[]
  totals: Pick<BoothStats, 'generated' | 'acked' | 'pending' | 'failed' | 'faults' | 'gaps' | 'dropped'>
}

export interface SimulatorHandle {
  readonly booths: readonly BoothInfo[]
  /** Resolves once every booth has produced `count` messages and all were acknowledged, or once stop() is done. */
  readonly done: Promise<void>
  /** Stops producing, waits (bounded) for acknowledgements, publishes retained "offline", disconnects. Idempotent. */
  stop(): Promise<void>
  stats(): SimulatorStats
}

interface BoothRunner {
  info: BoothInfo
  model: BoothModel
  client: MqttClient
  timer: ReturnType<typeof setTimeout> | undefined
  tick: number
  firstTickMs: number
  stats: Omit<BoothStats, keyof BoothInfo | 'connected' | 'mode' | 'phase' | 'pending'>
  pending: Set<Promise<unknown>>
  connectedOnce: boolean
  finished: boolean
  /** Last time each distinct log message was printed (repeats are suppressed for 30 s). */
  logged: Map<string, number>
}

function withTimeout<T>(promise: Promise<T>, ms: number): Promise<T | 'timeout'> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => resolve('timeout'), ms)
    promise.then(
      (value) => {
        clearTimeout(timer)
        resolve(value)
      },
      (error: unknown) => {
        clearTimeout(timer)
        reject(error instanceof Error ? error : new Error(String(error)))
      },
    )
  })
}

function formatSkew(ms: number): string {
  return `${ms >= 0 ? '+' : '−'}${(Math.abs(ms) / 1000).toFixed(1)} s`
}

function resolveBooths(booths: SimulatorOptions['booths']): BoothSpec[] {
  if (booths === undefined) return boothSpecs(3)
  if (typeof booths === 'number') return boothSpecs(booths)
  if (booths.length === 0) throw new RangeError('at least one booth is needed')
  return booths.map((booth) => ({ booth, kind: kindForBooth(booth) }))
}

export function startSimulator(options: SimulatorOptions = {}): SimulatorHandle {
  const site = options.site ?? DEMO_SITE
  const url = options.url ?? process.env.MQTT_URL ?? DEFAULT_MQTT_URL
  const password = options.password ?? process.env.DEMO_DEVICE_PASSWORD
  const speed = options.speed ?? 1
  const rateHz = options.rateHz ?? 1
  const faults = options.faults ?? 0
  const count = options.count
  const startedAtMs = options.startMs ?? Date.now()
  const seed: SeedInput = options.seed ?? hashSeed(startedAtMs)
  const log = options.log ?? ((): void => {})
  const logInfo = (line: string): void => log(line, 'info')
  const drainTimeoutMs = options.drainTimeoutMs ?? 5000
  const maxPending = options.maxPendingPerBooth ?? 100_000
  const summaryIntervalMs = options.summaryIntervalMs ?? (options.log ? 10_000 : 0)

  if (!Number.isFinite(rateHz) || rateHz <= 0 || rateHz > 1000) throw new RangeError(`rate must be within (0, 1000] Hz, got ${rateHz}`)
  if (count !== undefined && (!Number.isInteger(count) || count < 1)) throw new RangeError(`count must be a positive integer, got ${count}`)
  const periodMs = 1000 / rateHz
  const specs = resolveBooths(options.booths)
  const runners: BoothRunner[] = []
  let stopped = false
  let stopping: Promise<void> | undefined
  let summaryTimer: ReturnType<typeof setInterval> | undefined

  let resolveDone: () => void = () => {}
  const done = new Promise<void>((resolve) => {
    resolveDone = resolve
  })

  function logError(runner: BoothRunner, message: string): void {
    const now = Date.now()
    const last = runner.logged.get(message)
    if (last !== undefined && now - last < 30_000) return
    if (runner.logged.size > 100) runner.logged.clear()
    runner.logged.set(message, now)
    log(`[sim] ${runner.info.deviceId}: ${message}`, 'warn')
  }

  function track(runner: BoothRunner, promise: Promise<unknown>, onAck?: () => void): void {
    const p = promise.then(
      () => {
        onAck?.()
      },
      (error: unknown) => {
        if (onAck) runner.stats.failed += 1
        logError(runner, `publish failed: ${error instanceof Error ? error.message : String(error)}`)
      },
    )
    runner.pending.add(p)
    void p.finally(() => {
      runner.pending.delete(p)
      checkDone()
    })
  }

  function publish(runner: BoothRunner, topic: string, payload: string, retain: boolean, onAck?: () => void): void {
    track(runner, runner.client.publishAsync(topic, payload, { qos: 1, retain }), onAck)
  }

  function checkDone(): void {
    if (count === undefined) return
    if (runners.length === 0 || !runners.every((r) => r.finished && r.pending.size === 0)) return
    resolveDone()
  }

  function onTick(runner: BoothRunner): void {
    runner.timer = undefined
    if (stopped || runner.finished) return
    let dueMs = runner.firstTickMs + runner.tick * periodMs
    const now = Date.now()
    // After a long stall (suspended laptop, blocked loop) skip ahead instead of bursting the backlog.
    const behind = Math.floor((now - dueMs) / periodMs)
    if (behind > 10) {
      runner.tick += behind
      runner.stats.dropped += behind
      dueMs = runner.firstTickMs + runner.tick * periodMs
    }
    runner.tick += 1

    const step = runner.model.next(dueMs)
    if (step.modeChanged) {
      runner.stats.modeChanges += 1
      publish(runner, runner.info.topics.mode, modePayload(step.modeChanged, step.tsMs), true)
    }
    if (step.payload === null) {
      runner.stats.gaps += 1
    } else if (runner.pending.size >= maxPending) {
      runner.stats.dropped += 1
    } else {
      runner.stats.generated += 1
      if (step.fault) runner.stats.faults += 1
      if (step.reading) runner.stats.last = step.reading
      publish(runner, runner.info.topics.reading, step.payload, false, () => {
        runner.stats.acked += 1
      })
      if (count !== undefined && runner.stats.generated >= count) {
        runner.finished = true
        checkDone()
        return
      }
    }
    schedule(runner)
  }

  function schedule(runner: BoothRunner): void {
    if (stopped || runner.finished) return
    const dueMs = runner.firstTickMs + runner.tick * periodMs
    runner.timer = setTimeout(() => onTick(runner), Math.max(0, dueMs - Date.now()))
  }

  specs.forEach((spec, index) => {
    const topics = boothTopics(site, spec.booth)
    const deviceId = deviceIdFor(site, spec.booth)
    const model = createBoothModel({
      ...options.model,
      booth: spec.booth,
      kind: spec.kind,
      seed,
      speed,
      startMs: startedAtMs,
      faults,
      ...(options.humidityDriftPct !== undefined ? { humidityDriftPct: options.humidityDriftPct } : {}),
      ...(options.dropouts !== undefined ? { dropouts: options.dropouts } : {}),
    })
    const clientOptions: IClientOptions = {
      clientId: deviceId,
      username: deviceId,
      ...(password !== undefined && password !== '' ? { password } : {}),
      clean: true,
      reconnectPeriod: 1000,
      connectTimeout: 10_000,
      protocolVersion: options.protocolVersion ?? 4,
      will: { topic: topics.status, payload: STATUS_OFFLINE, qos: 1, retain: true },
    }
    const client = connect(url, clientOptions)
    const info: BoothInfo = { booth: spec.booth, kind: spec.kind, deviceId, topics, skewMs: model.skewMs }
    const runner: BoothRunner = {
      info,
      model,
      client,
      timer: undefined,
      tick: 0,
      // Spread the booths over one period so their messages do not all go out together.
      firstTickMs: startedAtMs + (index / specs.length) * periodMs,
      stats: { generated: 0, acked: 0, failed: 0, faults: 0, gaps: 0, dropped: 0, modeChanges: 0, last: undefined },
      pending: new Set(),
      connectedOnce: false,
      finished: false,
      logged: new Map(),
    }
    client.on('connect', () => {
      if (runner.connectedOnce) {
        logInfo(`[sim] ${deviceId}: reconnected`)
        // The last will may have marked the booth offline meanwhile.
        if (!stopped) publish(runner, topics.status, STATUS_ONLINE, true)
      }
      runner.connectedOnce = true
    })
    client.on('offline', () => {
      if (!stopped) logError(runner, `offline (broker ${url} unreachable), queueing messages`)
    })
    client.on('error', (error: Error) => logError(runner, error.message))
    runners.push(runner)

    // Presence and the current mode go out first (queued until the connection is up).
    publish(runner, topics.status, STATUS_ONLINE, true)
    publish(runner, topics.mode, modePayload(model.mode, startedAtMs + model.skewMs), true)
    logInfo(
      `[sim] ${spec.booth.padEnd(14)} ${spec.kind.padEnd(9)} device ${deviceId.padEnd(24)} ` +
        `topic ${topics.reading}  skew ${formatSkew(model.skewMs)}  mode ${model.mode}`,
    )
    schedule(runner)
  })

  logInfo(
    `[sim] ${runners.length} booth(s) → ${url}  site ${site}  seed ${String(seed)}  speed ×${speed}  ` +
      `${rateHz} Hz${faults > 0 ? `  faults ${(faults * 100).toFixed(1)} %` : ''}${count !== undefined ? `  count ${count}` : ''}` +
      (password === undefined || password === '' ? '  (no password: set DEMO_DEVICE_PASSWORD or --password)' : ''),
  )

  function boothStats(r: BoothRunner): BoothStats {
    return {
      ...r.info,
      ...r.stats,
      connected: r.client.connected,
      mode: r.model.mode,
      phase: r.model.state().phase,
      // Count reading publishes only (status/mode messages are tracked too, but are few).
      pending: Math.max(0, r.stats.generated - r.stats.acked - r.stats.failed),
    }
  }

  function stats(): SimulatorStats {
    const booths = runners.map(boothStats)
    const sum = (key: keyof SimulatorStats['totals']): number => booths.reduce((s, b) => s + b[key], 0)
    return {
      url,
      site,
      seed,
      speed,
      rateHz,
      faults,
      startedAtMs,
      uptimeMs: Date.now() - startedAtMs,
      complete: count !== undefined && runners.every((r) => r.finished),
      stopped,
      booths,
      totals: {
        generated: sum('generated'),
        acked: sum('acked'),
        pending: sum('pending'),
        failed: sum('failed'),
        faults: sum('faults'),
        gaps: sum('gaps'),
        dropped: sum('dropped'),
      },
    }
  }

  if (summaryIntervalMs > 0) {
    summaryTimer = setInterval(() => {
      const s = stats()
      const t = s.totals
      const up = Math.round(s.uptimeMs / 1000)
      const online = s.booths.filter((b) => b.connected).length
      const head =
        `[sim] ${up}s  online ${online}/${s.booths.length}  sent ${t.generated}  acked ${t.acked}  pending ${t.pending}` +
        `  faults ${t.faults}  gaps ${t.gaps}${t.dropped > 0 ? `  dropped ${t.dropped}` : ''}`
      const shown = s.booths.slice(0, 6).map((b) => {
        const l = b.last
        const air = l?.airTempC !== undefined ? `${l.airTempC.toFixed(1)}°C` : '–'
        const rh = l?.rhPct !== undefined ? `${l.rhPct.toFixed(0)}%` : '–'
        return `${b.booth} ${b.mode} ${air} ${rh}`
      })
      const more = s.booths.length > shown.length ? ` | +${s.booths.length - shown.length} more` : ''
      logInfo(`${head} | ${shown.join(' | ')}${more}`)
    }, summaryIntervalMs)
  }

  async function stopRunner(runner: BoothRunner): Promise<void> {
    const { client } = runner
    if (client.connected) {
      await withTimeout(Promise.allSettled([...runner.pending]), drainTimeoutMs)
      try {
        await withTimeout(client.publishAsync(runner.info.topics.status, STATUS_OFFLINE, { qos: 1, retain: true }), 2000)
      } catch (error) {
        logError(runner, `offline status not sent: ${error instanceof Error ? error.message : String(error)}`)
      }
      try {
        const result = await withTimeout(client.endAsync(false), 2000)
        if (result === 'timeout') await client.endAsync(true)
      } catch {
        await client.endAsync(true).catch(() => undefined)
      }
    } else {
      // Not connected: the broker already holds (or will publish) the "offline" last will.
      await client.endAsync(true).catch(() => undefined)
    }
  }

  function stop(): Promise<void> {
    if (stopping) return stopping
    stopped = true
    if (summaryTimer) clearInterval(summaryTimer)
    for (const r of runners) {
      if (r.timer) clearTimeout(r.timer)
      r.timer = undefined
    }
    stopping = Promise.all(runners.map(stopRunner)).then(() => {
      const t = stats().totals
      log(
        `[sim] stopped: sent ${t.generated}, acked ${t.acked}, pending ${t.pending}, failed ${t.failed}, ` +
          `faults ${t.faults}, gaps ${t.gaps}`,
        'result',
      )
      resolveDone()
    })
    return stopping
  }

  return {
    booths: runners.map((r) => r.info),
    done,
    stop,
    stats,
  }
}
