import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync } from 'node:fs'
import { ensureBuilt } from './lib/build'
import { startPostgres, stopPostgres } from './lib/postgres'
import { TEST_PG } from '../tests/support/test-postgres'
import { ensureChromium } from '../tests/support/browser'
import { ensureMosquittoInstalled } from '../tests/support/mosquitto'

// npm test: the tests' own PostgreSQL (own data folder and port), a fresh build, every vitest
// project (unit, nuxt, integration, browser), the type-check, then PostgreSQL stopped again.
// Extra arguments go to vitest (e.g. `npm test -- --project unit`).
const args = process.argv.slice(2)
let failed = false

const pgInfo = await startPostgres(TEST_PG)
try {
  // Debian's Chromium (browser tests) and Mosquitto (scale tests) installed here, one after the other, when
  // missing: the test files run in parallel and would otherwise each start an install.
  ensureChromium()
  ensureMosquittoInstalled()
  ensureBuilt(process.env.CI === 'true')
  mkdirSync('test-results', { recursive: true })
  const vitest = spawnSync(
    'npx',
    ['vitest', 'run', '--reporter=default', '--reporter=json', '--outputFile.json=test-results/vitest.json', ...args],
    { stdio: 'inherit', env: { ...process.env, TEST_PG_ADMIN_URL: pgInfo.url, BOOTHBEAT_SKIP_BUILD: '1' } },
  )
  if (vitest.status !== 0) failed = true
  if (existsSync('test-results/vitest.json')) {
    const r = JSON.parse(readFileSync('test-results/vitest.json', 'utf8')) as {
      numPassedTests: number
      numFailedTests: number
      numFailedTestSuites: number
      numPendingTests: number
      numTodoTests: number
    }
    // A file that fails before its tests run counts as a failure too.
    const failures = r.numFailedTests || r.numFailedTestSuites
    console.log(`\nvitest: ${r.numPassedTests} passed, ${failures} failed, ${r.numPendingTests + r.numTodoTests} skipped`)
    if (r.numPassedTests === 0) failed = true
  }
  if (!args.length) {
    console.log('\n[typecheck] nuxt typecheck …')
    const tc = spawnSync('npx', ['nuxt', 'typecheck'], { stdio: 'inherit' })
    if (tc.status !== 0) {
      failed = true
      console.log('[typecheck] failed')
    } else console.log('[typecheck] passed')
  }
} finally {
  if (!process.env.KEEP_TEST_PG) stopPostgres(TEST_PG.dataDir)
}
process.exit(failed ? 1 : 0)
