import { settings } from '../config'
import { startTelemetry, telemetry } from '../telemetry/runtime'

// Broker (embedded unless MQTT_URL), subscriber and ingest start once the database is migrated, in
// the background; both close with Nitro.
export default defineNitroPlugin((nitro) => {
  if (process.env.BOOTHBEAT_TELEMETRY === 'off') return
  const started = databaseReady()
    .then(() => startTelemetry(useDb(), usePool(), settings(), passwordHasher))
    .then(() => setComponentState('telemetry', true))
    .catch((e: unknown) => {
      setComponentState('telemetry', false, e instanceof Error ? e.message : String(e))
      console.error('[telemetry] start failed:', e)
    })
  nitro.hooks.hook('close', async () => {
    await started
    await telemetry()?.stop()
  })
})
