import { sql } from 'kysely'

// Public contract (DESIGN.md §11): 200 when database, broker and ingestion are up, else 503.
export default defineEventHandler(async (event) => {
  const started = Date.now()
  let database: { up: boolean; latencyMs?: number; error?: string }
  try {
    await sql`SELECT 1`.execute(useDb())
    const migrated = componentStates().database?.up ?? false
    database = { up: migrated, latencyMs: Date.now() - started, ...(migrated ? {} : { error: 'migrating' }) }
  } catch (e) {
    database = { up: false, error: e instanceof Error ? e.message : String(e) }
  }
  const components = componentStates()
  const telemetry = healthOfTelemetry()
  // Every component that announced itself (alerts, bakes …) must have finished starting.
  const up = database.up && telemetry.up && Object.values(components).every((c) => c.up)
  setResponseStatus(event, up ? 200 : 503)
  return { status: up ? 'ok' : 'degraded', database, ...telemetry.body, components }
})
