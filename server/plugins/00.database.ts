import { migrateToLatest } from '../db/migrate'
import { seedDemo } from '../domain/demo-seed'
import { settings } from '../config'

// Migrate at start (safe with several instances), seed the invented demo shop when asked, and
// the pool closes last (99.close-database.ts). Plugins run synchronously, so the work runs in the background and
// API requests wait for it (server/middleware/00.ready.ts).
export default defineNitroPlugin(() => {
  const s = settings()
  const ready = (async () => {
    await migrateToLatest(useDb(), usePool())
    if (s.DEMO_SEED === '1') await seedDemo(useDb(), passwordHasher, s)
    setComponentState('database', true)
  })()
  ready.catch((e: unknown) => {
    setComponentState('database', false, e instanceof Error ? e.message : String(e))
    console.error('[db] start-up failed:', e)
  })
  setDatabaseReady(ready)
})
