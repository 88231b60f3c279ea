import type { Migration, MigrationProvider } from 'kysely'
import * as m0001 from './0001_accounts_and_booths'
import * as m0002 from './0002_telemetry'
import * as m0003 from './0003_rate_limits'

// Statically imported so the Nitro bundle carries them (a folder scan would find nothing at run time).
// Add a new migration: create NNNN_name.ts beside this file and list it here, in order.
const migrations: Record<string, Migration> = {
  '0001_accounts_and_booths': m0001,
  '0002_telemetry': m0002,
  '0003_rate_limits': m0003,
}

export const staticMigrations: MigrationProvider = {
  getMigrations: async () => migrations,
}
