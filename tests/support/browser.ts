import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { createRequire } from 'node:module'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'
import { aptInstall, isRoot } from '../../scripts/lib/apt'

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
  if (isRoot) aptInstall(['chromium'], { noRecommends: true })
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: install Debian's chromium package (apt-get install chromium)`)
}

export interface BrowserSession {
  context: BrowserContext
  page: Page
  /** The profile folder (--user-data-dir), which also finds this browser's processes. */
  profile: string
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
    profile,
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

// ── journeys ────────────────────────────────────────────────────────────────────────────────────

/** Signs in on /login as someone and waits until the page has left /login. */
export async function signIn(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/login`)
  await page.locator('#login-email').fill(email)
  await page.locator('#login-password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL((u) => u.pathname !== '/login', { timeout: 30_000 })
}

/** Prints the page's console errors and failed requests to the test output (so a failure shows why). */
export function echoPageErrors(page: Page, tag: string): void {
  page.on('console', (m) => {
    if (m.type() === 'error') console.log(`[${tag}] console:`, m.text())
  })
  page.on('pageerror', (e) => console.log(`[${tag}] page error:`, e.message))
}

// ── accessibility ───────────────────────────────────────────────────────────────────────────────

// axe-core from node_modules, injected into the page (no network). Rules tagged wcag2a, wcag2aa, wcag21a and
// wcag21aa are WCAG 2.1 level A and AA checks as axe-core maps them (axe-core rule descriptions, Deque).
export const AXE_SOURCE = createRequire(import.meta.url).resolve('axe-core/axe.min.js')
export const WCAG21_AA_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] as const

export interface AxeNode {
  target: string[]
  html: string
  failureSummary: string
}
export interface AxeViolation {
  id: string
  impact: string | null
  help: string
  helpUrl: string
  tags: string[]
  nodes: AxeNode[]
}
export interface AxeOutcome {
  violations: AxeViolation[]
  /** Checks that passed, by rule id (e.g. 'color-contrast', 'button-name', 'label'). */
  passes: { id: string; nodes: number }[]
  /** Nodes axe could not decide (e.g. text over an image), by rule id. */
  incomplete: { id: string; nodes: AxeNode[] }[]
}

/** Runs axe-core in the page over `include` (a CSS selector, default the whole document). */
export async function runAxe(page: Page, opts: { include?: string; rules?: string[] } = {}): Promise<AxeOutcome> {
  const present = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe === 'object')
  if (!present) await page.addScriptTag({ path: AXE_SOURCE })
  return page.evaluate(
    async ({ include, rules, tags }) => {
      interface AxeResultNode {
        target: unknown[]
        html: string
        failureSummary?: string
      }
      interface AxeResult {
        id: string
        impact?: string | null
        help: string
        helpUrl: string
        tags: string[]
        nodes: AxeResultNode[]
      }
      interface AxeApi {
        run(context: unknown, options: unknown): Promise<{ violations: AxeResult[]; passes: AxeResult[]; incomplete: AxeResult[] }>
      }
      const axe = (window as unknown as { axe: AxeApi }).axe
      const options = rules ? { runOnly: { type: 'rule', values: rules } } : { runOnly: { type: 'tag', values: tags } }
      const r = await axe.run(include ? { include: [include] } : document, { ...options, resultTypes: ['violations', 'incomplete', 'passes'] })
      const node = (n: AxeResultNode) => ({ target: n.target.map(String), html: n.html.slice(0, 300), failureSummary: n.failureSummary ?? '' })
      return {
        violations: r.violations.map((v) => ({ id: v.id, impact: v.impact ?? null, help: v.help, helpUrl: v.helpUrl, tags: v.tags, nodes: v.nodes.map(node) })),
        passes: r.passes.map((p) => ({ id: p.id, nodes: p.nodes.length })),
        incomplete: r.incomplete.map((p) => ({ id: p.id, nodes: p.nodes.map(node) })),
      }
    },
    { include: opts.include ?? null, rules: opts.rules ?? null, tags: [...WCAG21_AA_TAGS] },
  )
}

/** A readable list of axe violations for an assertion message. */
export function describeViolations(vs: AxeViolation[]): string {
  return vs.map((v) => `${v.id} (${v.impact}): ${v.help}\n${v.nodes.map((n) => `    ${n.target.join(' ')}  ${n.failureSummary.replace(/\s+/g, ' ')}`).join('\n')}`).join('\n')
}

export interface FocusStop {
  /** tag#id.testid: what got the focus. */
  what: string
  name: string
  /** The focus indicator drawn: outline width/style/colour, or a box-shadow. */
  indicator: string
  visible: boolean
  /** Contrast of the outline colour against the background behind the element (WCAG 2.1 SC 1.4.11: ≥ 3:1). */
  indicatorContrast: number | null
  /** Whether it lies inside `within` (when given): a modal dialog keeps the focus inside itself. */
  inside: boolean | null
}

/**
 * Tabs through the page from the top and records each element that took the focus with its focus indicator,
 * until the focus comes back to the first one (or `max` stops). Keyboard focus, so :focus-visible applies.
 */
export async function tabThrough(page: Page, opts: { max?: number; within?: string; fromCurrent?: boolean } = {}): Promise<FocusStop[]> {
  const max = opts.max ?? 80
  // From the top of the page, or (a dialog that took the focus) from where the focus is now.
  if (!opts.fromCurrent) {
    await page.evaluate(() => {
      ;(document.activeElement as HTMLElement | null)?.blur()
      window.getSelection()?.removeAllRanges()
    })
  }
  const stops: FocusStop[] = []
  let first: string | null = null
  for (let i = 0; i < max; i++) {
    await page.keyboard.press('Tab')
    const stop = await page.evaluate((within) => {
      const el = document.activeElement as HTMLElement | null
      if (!el || el === document.body) return null
      const marker = el.getAttribute('data-focus-probe') ?? String(Math.random())
      el.setAttribute('data-focus-probe', marker)
      const cs = getComputedStyle(el)
      const parse = (c: string): [number, number, number, number] | null => {
        const m = /rgba?\(([\d.]+)[ ,]+([\d.]+)[ ,]+([\d.]+)(?:[ ,/]+([\d.]+))?\)/.exec(c)
        return m ? [Number(m[1]), Number(m[2]), Number(m[3]), m[4] === undefined ? 1 : Number(m[4])] : null
      }
      // Relative luminance and contrast ratio: WCAG 2.1, definitions "relative luminance" and "contrast ratio".
      const lum = ([r, g, b]: number[]) => {
        const f = (v: number) => {
          const s = v / 255
          return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4
        }
        return 0.2126 * f(r!) + 0.7152 * f(g!) + 0.0722 * f(b!)
      }
      const ratio = (a: number[], b: number[]) => {
        const [x, y] = [lum(a), lum(b)].sort((p, q) => q - p)
        return (x! + 0.05) / (y! + 0.05)
      }
      // The background behind the outline: the first opaque background among the ancestors.
      let bg: number[] = [255, 255, 255]
      for (let p = el.parentElement; p; p = p.parentElement) {
        const c = parse(getComputedStyle(p).backgroundColor)
        if (c && c[3] > 0.5) {
          bg = c
          break
        }
      }
      const outlineW = parseFloat(cs.outlineWidth) || 0
      const hasOutline = cs.outlineStyle !== 'none' && outlineW >= 1
      const hasShadow = cs.boxShadow !== 'none' && cs.boxShadow !== ''
      const oc = parse(cs.outlineColor)
      const testid = el.getAttribute('data-testid')
      const name = (el.getAttribute('aria-label') ?? (el as HTMLInputElement).labels?.[0]?.textContent ?? el.textContent ?? '').replace(/\s+/g, ' ').trim().slice(0, 60)
      return {
        marker,
        what: `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ''}${testid ? `[${testid}]` : ''}`,
        name,
        indicator: hasOutline ? `outline ${cs.outlineWidth} ${cs.outlineStyle} ${cs.outlineColor}` : hasShadow ? `box-shadow ${cs.boxShadow}` : 'none',
        visible: hasOutline || hasShadow,
        indicatorContrast: hasOutline && oc ? Math.round(ratio(oc, bg) * 100) / 100 : null,
        inside: within ? el.closest(within) !== null : null,
      }
    }, opts.within ?? null)
    if (!stop) continue
    if (first === null) first = stop.marker
    else if (stop.marker === first) break
    stops.push({ what: stop.what, name: stop.name, indicator: stop.indicator, visible: stop.visible, indicatorContrast: stop.indicatorContrast, inside: stop.inside })
  }
  await page.evaluate(() => document.querySelectorAll('[data-focus-probe]').forEach((e) => e.removeAttribute('data-focus-probe')))
  return stops
}

// ── memory ──────────────────────────────────────────────────────────────────────────────────────

/**
 * Memory of all of this session's Chromium processes (found by their profile folder), MiB: the sum of their
 * proportional set sizes (PSS: shared pages split between the processes that share them, so the sum is not
 * inflated by the shared libraries), the plain sum of their resident sizes, and the sum of their VmHWM peaks.
 */
export function chromiumMemory(session: BrowserSession): { processes: number; pssMiB: number; rssMiB: number; peakSumMiB: number } {
  let processes = 0
  let pss = 0
  let rss = 0
  let hwm = 0
  for (const pid of readdirSync('/proc')) {
    if (!/^\d+$/.test(pid)) continue
    try {
      const cmd = readFileSync(`/proc/${pid}/cmdline`, 'utf8')
      if (!cmd.includes(session.profile)) continue
      const s = readFileSync(`/proc/${pid}/status`, 'utf8')
      const kb = (text: string, k: string) => Number(new RegExp(`${k}:\\s+(\\d+)`).exec(text)?.[1] ?? 0)
      processes++
      rss += kb(s, 'VmRSS')
      hwm += kb(s, 'VmHWM')
      pss += kb(readFileSync(`/proc/${pid}/smaps_rollup`, 'utf8'), 'Pss')
    } catch {
      // the process ended while we looked
    }
  }
  return { processes, pssMiB: pss / 1024, rssMiB: rss / 1024, peakSumMiB: hwm / 1024 }
}
