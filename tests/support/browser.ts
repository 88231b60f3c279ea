import { spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'

// Debian's Chromium driven by playwright-core (no browser download). Each call gets its own browser
// process with a fresh profile, so two people (a booth screen and a manager) never share cookies.
export const CHROMIUM = '/usr/bin/chromium'
export const SCREENSHOT_DIR = resolve('test-results/screenshots')

const ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
]

/** Installs Debian's chromium with apt-get when it is missing and we are root; else explains. */
export function ensureChromium(): void {
  if (existsSync(CHROMIUM)) return
  if (process.getuid?.() === 0) {
    spawnSync('apt-get', ['update'], { stdio: 'inherit' })
    spawnSync('apt-get', ['install', '-y', '--no-install-recommends', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
  }
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: install Debian's chromium package (apt-get install chromium)`)
}

export interface BrowserSession {
  context: BrowserContext
  page: Page
  close(): Promise<void>
}

/** One Chromium with a fresh --user-data-dir and one page. */
export async function openBrowser(opts: { width?: number; height?: number } = {}): Promise<BrowserSession> {
  ensureChromium()
  // Playwright passes the profile folder to Chromium as --user-data-dir itself.
  const profile = mkdtempSync(join(tmpdir(), 'boothbeat-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: ARGS,
    viewport: { width: opts.width ?? 1280, height: opts.height ?? 800 },
  })
  const page = context.pages()[0] ?? (await context.newPage())
  return {
    context,
    page,
    async close() {
      await context.close().catch(() => undefined)
      rmSync(profile, { recursive: true, force: true })
    },
  }
}

/** Saves a full-page screenshot as test-results/screenshots/<name>.png and returns the path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true })
  const path = join(SCREENSHOT_DIR, `${name}.png`)
  await page.screenshot({ path, fullPage: true })
  return path
}
