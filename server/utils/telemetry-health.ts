import { ingestHealth } from '../telemetry/runtime'

/** Broker, subscriber and ingest part of /api/health. */
export function healthOfTelemetry(): { up: boolean; body: Record<string, unknown> } {
  return ingestHealth()
}
