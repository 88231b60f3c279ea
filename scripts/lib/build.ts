import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'

const SOURCES = ['app.vue', 'nuxt.config.ts', 'tailwind.config.ts', 'pages', 'components', 'layouts', 'stores', 'composables', 'middleware', 'server', 'shared', 'assets', 'public', 'package-lock.json']
export const SERVER_ENTRY = '.output/server/index.mjs'

function newest(path: string): number {
  if (!existsSync(path)) return 0
  const st = statSync(path)
  if (!st.isDirectory()) return st.mtimeMs
  let max = st.mtimeMs
  for (const e of readdirSync(path)) max = Math.max(max, newest(join(path, e)))
  return max
}

/**
 * Builds the app when the build is missing or older than any source file. Under an exclusive lock
 * (flock on .data/build.lock) so parallel test runs in one checkout never build over each other.
 */
export function ensureBuilt(force = false): void {
  if (!process.env.BOOTHBEAT_BUILD_LOCKED) {
    mkdirSync('.data', { recursive: true })
    const r = spawnSync('flock', ['-x', '.data/build.lock', process.execPath, '--import', 'tsx', 'scripts/lib/build-cli.ts', ...(force ? ['--force'] : [])], {
      stdio: 'inherit',
      env: { ...process.env, BOOTHBEAT_BUILD_LOCKED: '1' },
    })
    if (r.status !== 0) throw new Error('nuxt build failed')
    return
  }
  buildIfStale(force)
}

function buildIfStale(force: boolean): void {
  const built = existsSync(SERVER_ENTRY) ? statSync(SERVER_ENTRY).mtimeMs : 0
  const sources = Math.max(...SOURCES.map(newest))
  if (!force && built > sources) {
    console.log('[build] up to date')
    return
  }
  // A `nuxt typecheck` or build started by hand outside the lock shares the cache folder; one retry
  // covers that race without hiding a real build error (which fails twice).
  for (let attempt = 1; ; attempt++) {
    console.log('[build] nuxt build …')
    const r = spawnSync('npx', ['nuxt', 'build'], { stdio: ['ignore', 'pipe', 'inherit'], encoding: 'utf8' })
    if (r.status === 0) break
    if (attempt >= 2) {
      console.log(r.stdout)
      throw new Error('nuxt build failed')
    }
    console.log('[build] failed; trying once more')
  }
  console.log('[build] done')
}
