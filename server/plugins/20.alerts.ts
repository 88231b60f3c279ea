import type { BoothModeValue } from '../telemetry/wire'
import type { ReadingRow } from '../telemetry/reading-row'
import { settings } from '../config'
import { setTelemetryHooks } from '../telemetry/runtime'
import { loadLatestStates } from '../telemetry/latest'
import { isBoothMode } from '#shared/watch'
import { AlertRuntime, setAlertRuntime, type InitialBooth } from '../alerts/runtime'
import { Notifier } from '../alerts/notifier'
import { parseQuietHours } from '../alerts/plan'
import { createMailSender } from '../mail/transport'
import { OutboxWorker } from '../mail/outbox-worker'

// Watches and alerts: owns the telemetry hooks (one hooks object; compose here if another area needs them),
// runs the per-booth evaluators, the notifier and the outbox worker. Readings that arrive before the runtime
// has loaded its state are held (bounded) and fed to it once it is ready.
const EARLY_READINGS_MAX = 20_000

export default defineNitroPlugin((nitro) => {
  if (process.env.BOOTHBEAT_ALERTS === 'off') return
  const s = settings()
  const early: ReadingRow[] = []
  const earlyModes: [number, BoothModeValue][] = []
  let runtime: AlertRuntime | undefined
  // Without ingest (BOOTHBEAT_TELEMETRY=off) nothing is evaluated: every booth would only look silent. Alerts can
  // still be read, acknowledged and resolved, and queued mail is still sent.
  const evaluate = process.env.BOOTHBEAT_TELEMETRY !== 'off'

  if (evaluate) setTelemetryHooks({
    onAccepted(row) {
      try {
        if (runtime) runtime.onAccepted(row)
        else if (early.length < EARLY_READINGS_MAX) early.push(row)
      } catch (e) {
        console.warn('[alerts] reading not evaluated:', e instanceof Error ? e.message : e)
      }
    },
    onMode(boothId, mode) {
      if (runtime) runtime.onMode(boothId, mode)
      else if (earlyModes.length < 1_000) earlyModes.push([boothId, mode])
    },
  })

  const db = useDb()
  const sender = createMailSender(s.SMTP_URL)
  const worker = new OutboxWorker(db, sender, {
    from: s.MAIL_FROM,
    retryBaseMs: s.OUTBOX_RETRY_BASE_SEC * 1000,
    retryMaxMs: s.OUTBOX_RETRY_MAX_SEC * 1000,
    maxAttempts: s.OUTBOX_MAX_ATTEMPTS,
  })
  const notifier = new Notifier(
    db,
    {
      plan: {
        rateLimitMs: s.ALERT_RATE_LIMIT_SEC * 1000,
        digestAfter: s.ALERT_DIGEST_AFTER,
        digestWindowMs: s.ALERT_DIGEST_WINDOW_SEC * 1000,
        quietHours: parseQuietHours(s.ALERT_QUIET_HOURS),
        escalateAfterMs: s.ALERT_ESCALATE_AFTER_SEC * 1000,
        escalateMax: s.ALERT_ESCALATE_MAX,
      },
      publicUrl: s.PUBLIC_URL,
      timeZone: s.ALERT_TIME_ZONE,
    },
    () => void worker.run(),
  )
  const timers: NodeJS.Timeout[] = []

  setComponentState('alerts', false, 'starting')
  const started = databaseReady()
    .then(async () => {
      timers.push(setInterval(() => void notifier.run(), 1_000))
      timers.push(setInterval(() => void worker.run(), 1_000))
      if (!evaluate) {
        setComponentState('alerts', true, 'not evaluating: telemetry is off')
        return
      }
      const r = new AlertRuntime(db, {
        initialBooths: async (): Promise<InitialBooth[]> =>
          (await loadLatestStates(db)).map((st) => ({
            boothId: st.boothId,
            mode: isBoothMode(st.mode) ? st.mode : null,
            lastReading: st.reading ? { tsMs: Date.parse(st.reading.ts), receivedMs: Date.parse(st.reading.receivedAt) } : null,
          })),
        onCommitted: (changes) => {
          if (changes.some((c) => c.type === 'opened')) void notifier.run()
        },
      })
      await r.start()
      for (const [boothId, mode] of earlyModes.splice(0)) r.onMode(boothId, mode)
      for (const row of early.splice(0)) r.onAccepted(row)
      runtime = r
      setAlertRuntime(r)
      setComponentState('alerts', true)
    })
    .catch((e: unknown) => {
      setComponentState('alerts', false, e instanceof Error ? e.message : String(e))
      console.error('[alerts] start failed:', e)
    })

  nitro.hooks.hook('close', async () => {
    await started
    for (const t of timers) clearInterval(t)
    await runtime?.stop().catch((e: unknown) => console.warn('[alerts] stop:', e instanceof Error ? e.message : e))
    setAlertRuntime(undefined)
    sender.close()
  })
})
