import type { TestProject } from 'vitest/node'
import { ensureBuilt } from '../../scripts/lib/build'
import { startPostgres, stopPostgres } from '../../scripts/lib/postgres'
import { TEST_PG } from './test-postgres'

declare module 'vitest' {
  export interface ProvidedContext {
    pgAdminUrl: string
  }
}

// Integration and browser tests need PostgreSQL and a built server. `npm test` (scripts/test.ts)
// prepares both and passes TEST_PG_ADMIN_URL; run alone, vitest does it here.
export default async function setup(project: TestProject) {
  let started = false
  let url = process.env.TEST_PG_ADMIN_URL
  if (!url) {
    url = (await startPostgres(TEST_PG)).url
    started = true
  }
  project.provide('pgAdminUrl', url)
  if (!process.env.BOOTHBEAT_SKIP_BUILD) ensureBuilt()
  return () => {
    if (started && !process.env.KEEP_TEST_PG) stopPostgres(TEST_PG.dataDir)
  }
}
