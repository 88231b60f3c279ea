import type { Migration, MigrationProvider } from 'kysely'
import * as m0001 from './0001_accounts_and_booths'
import * as m0002 from './0002_telemetry'
import * as m0003 from './0003_rate_limits'
import * as m0004 from './0004_spec_sheets'
import * as m0005 from './0005_jobs_and_coats'
import * as m0006 from './0006_watches_and_alerts'
import * as m0007 from './0007_bakes_and_maintenance'
import * as m0008 from './0008_evidence'
import * as m0009 from './0009_event_log'

// Statically imported so the Nitro bundle carries them (a folder scan would find nothing at run time).
// Add a new migration: create NNNN_name.ts beside this file and list it here, in order.
const migrations: Record<string, Migration> = {
  '0001_accounts_and_booths': m0001,
  '0002_telemetry': m0002,
  '0003_rate_limits': m0003,
  '0004_spec_sheets': m0004,
  '0005_jobs_and_coats': m0005,
  '0006_watches_and_alerts': m0006,
  '0007_bakes_and_maintenance': m0007,
  '0008_evidence': m0008,
  '0009_event_log': m0009,
}

export const staticMigrations: MigrationProvider = {
  getMigrations: async () => migrations,
}
