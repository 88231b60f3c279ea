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
  setComponentState('bakes', false, 'starting')
  const started = databaseReady()
    .then(async () => {
      await reloadCalibrations(db)
      reload = setInterval(() => reloadCalibrations(db).catch((e: unknown) => console.warn('[calibration] reload failed:', e instanceof Error ? e.message : e)), 30_000)
      if (process.env.BOOTHBEAT_TELEMETRY === 'off') return setComponentState('bakes', true, 'not detecting: telemetry is off')
      detector = new BakeDetector(db)
      await detector.init()
      detector.start()
      unhook = setTelemetryHooks(detector.hooks())
      setComponentState('bakes', true)
    })
    .catch((e: unknown) => {
      setComponentState('bakes', false, e instanceof Error ? e.message : String(e))
      console.error('[bakes] start failed:', e)
    })
  nitro.hooks.hook('close', async () => {
    await started
    if (reload) clearInterval(reload)
    unhook?.()
    await detector?.stop()
  })
})
