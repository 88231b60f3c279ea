import { BakeDetector } from '../domain/bake-detector'
import { reloadCalibrations } from '../domain/calibration'
import { setTelemetryHooks } from '../telemetry/runtime'

// Bakes and upkeep at start-up, once the database is migrated: the calibration offsets are loaded (and
// reloaded every 30 s, for changes made on other instances), and the bake detector hooks into telemetry.
export default defineNitroPlugin((nitro) => {
  const db = useDb()
  let detector: BakeDetector | undefined
  let unhook: (() => void) | undefined
  let reload: ReturnType<typeof setInterval> | undefined
  const started = databaseReady()
    .then(async () => {
      await reloadCalibrations(db)
      reload = setInterval(() => reloadCalibrations(db).catch((e: unknown) => console.warn('[calibration] reload failed:', e instanceof Error ? e.message : e)), 30_000)
      if (process.env.BOOTHBEAT_TELEMETRY === 'off') return
      detector = new BakeDetector(db)
      await detector.init()
      detector.start()
      unhook = setTelemetryHooks(detector.hooks())
    })
    .catch((e: unknown) => console.error('[bakes] start failed:', e))
  nitro.hooks.hook('close', async () => {
    await started
    if (reload) clearInterval(reload)
    unhook?.()
    await detector?.stop()
  })
})
