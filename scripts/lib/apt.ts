import { execFileSync } from 'node:child_process'

// Debian packages the demo and the tests install when they are missing (PostgreSQL, Chromium, Mosquitto).
// Test files run in parallel and each may want a package: apt holds one lock at a time, so every call waits
// for it (up to 10 min) instead of failing when another install is under way.
const WAIT_FOR_LOCK = ['-o', 'DPkg::Lock::Timeout=600']

export const isRoot = process.getuid?.() === 0

/** `apt-get update` then `apt-get install` of `packages` (as root), waiting for apt's lock when it is held. */
export function aptInstall(packages: readonly string[], opts: { noRecommends?: boolean } = {}): void {
  if (!isRoot) throw new Error(`not root: install with  sudo apt-get install -y ${packages.join(' ')}`)
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  execFileSync('apt-get', [...WAIT_FOR_LOCK, 'update', '-qq'], { stdio: 'inherit', env })
  execFileSync('apt-get', [...WAIT_FOR_LOCK, 'install', '-y', '-qq', ...(opts.noRecommends ? ['--no-install-recommends'] : []), ...packages], { stdio: 'inherit', env })
}
