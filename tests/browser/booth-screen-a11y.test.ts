import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { MqttClient } from 'mqtt'
import type { Page } from 'playwright-core'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { describeViolations, echoPageErrors, openBrowser, runAxe, screenshot, signIn, tabThrough, type BrowserSession } from '../support/browser'
import { connectDevice, reading, topicOf } from '../support/mqtt'

// Accessibility basics of the booth screen (pages/screen/*, components/screen/**), in Chromium:
//   - axe-core 4.14 (injected from node_modules) with its WCAG 2.1 A/AA rules, among them color-contrast
//     (SC 1.4.3: 4.5:1, 3:1 for large text), button-name, label and aria-dialog-name (SC 4.1.2), on the pairing
//     form, the paired screen, the PIN dialog, a coat in progress and the mix dialog;
//   - every control reachable with Tab, with a visible focus indicator (SC 2.1.1, SC 2.4.7) whose colour stands at
//     least 3:1 against what is behind it (SC 1.4.11, non-text contrast).
let app: TestApp
let screen: BrowserSession
let device: MqttClient
let publisher: ReturnType<typeof setInterval> | undefined

beforeAll(async () => {
  app = await startTestApp()
  device = await connectDevice(app.mqttUrl, 'downdraft-1')
  publisher = setInterval(() => void device.publishAsync(topicOf('downdraft-1'), reading(Date.now(), { airTempC: 21, rhPct: 50, panelTempC: 20.5, airflowMps: 0.4 }), { qos: 1 }).catch(() => undefined), 1_000)
  screen = await openBrowser({ width: 1600, height: 1000 })
  echoPageErrors(screen.page, 'screen')
}, 180_000)

afterAll(async () => {
  if (publisher) clearInterval(publisher)
  await device?.endAsync().catch(() => undefined)
  await screen?.close()
  await app?.close()
})

// axe's "needs review" results are findings too, unless axe cannot judge them and they were checked by hand
// (contrast ratios computed from the design tokens in tailwind.config.ts, WCAG 2.1 formula):
//   - the percentage inside the flash ring: white over the SVG ring on ink-900, 16:1;
//   - symbol-only text (PIN slots ● / ○, the ⌫ key): ● and ⌫ white on ink-950 / ink-800 ≥ 13:1, ○ ink-400 on ink-950 5.6:1;
//   - the ⌫ key's name "Delete last digit": its visible label is a symbol, not text (SC 2.5.3 is about text labels).
const REVIEWED = [
  { rule: 'color-contrast', target: /progressbar/, summary: /background color could not be determined/ },
  { rule: 'color-contrast', target: /./, summary: /only non-text characters/ },
  { rule: 'label-content-name-mismatch', target: /Delete last digit/, summary: /./ },
]

/** axe over the page (or a part of it): no WCAG 2.1 A/AA violation, nothing left to review but REVIEWED. */
async function expectNoViolations(page: Page, where: string, alsoRan: string[] = []) {
  const r = await runAxe(page)
  // Soft: one run lists every finding, not only the first.
  expect.soft(r.violations, `${where}:\n${describeViolations(r.violations)}`).toEqual([])
  const open = r.incomplete.flatMap((i) => i.nodes.filter((n) => !REVIEWED.some((x) => x.rule === i.id && x.target.test(n.target.join(' ')) && x.summary.test(n.failureSummary))).map((n) => `${i.id}: ${n.target.join(' ')} ${n.failureSummary.replace(/\s+/g, ' ')}`))
  expect.soft(open, `${where}: axe needs review`).toEqual([])
  // The checks that matter here did run and find something to pass on.
  const passed = new Set(r.passes.map((p) => p.id))
  for (const rule of ['color-contrast', 'button-name', ...alsoRan]) expect(passed.has(rule), `${where}: ${rule} ran`).toBe(true)
  return r
}

/** Every visible, enabled control inside `root` (buttons, inputs, links, selects, tabindex ≥ 0). */
async function controlsIn(page: Page, root: string): Promise<string[]> {
  return page.locator(root).evaluate((el) => {
    const all = [...el.querySelectorAll<HTMLElement>('button, input, select, textarea, a[href], [tabindex]')]
    return all
      .filter((c) => {
        const cs = getComputedStyle(c)
        const r = c.getBoundingClientRect()
        const ti = c.getAttribute('tabindex')
        return !(c as HTMLButtonElement).disabled && cs.visibility !== 'hidden' && cs.display !== 'none' && r.width > 0 && r.height > 0 && (ti === null || Number(ti) >= 0)
      })
      .map((c) => `${c.tagName.toLowerCase()}${c.id ? `#${c.id}` : ''}${c.getAttribute('data-testid') ? `[${c.getAttribute('data-testid')}]` : ''}`)
  })
}

async function expectKeyboardReach(page: Page, root: string, where: string, modal = false) {
  // A modal dialog: from where its focus is, and every stop must stay inside it.
  const stops = await tabThrough(page, modal ? { within: root, fromCurrent: true } : {})
  const reached = new Set(stops.map((s) => s.what))
  const controls = await controlsIn(page, root)
  expect(controls.length, `${where}: controls found`).toBeGreaterThan(0)
  // Soft: one run lists every finding, not only the first.
  for (const c of controls) expect.soft(reached.has(c), `${where}: ${c} reachable with Tab (reached: ${[...reached].join(', ')})`).toBe(true)
  for (const s of stops) {
    expect.soft(s.visible, `${where}: ${s.what} shows a focus indicator`).toBe(true)
    if (s.indicatorContrast !== null) expect.soft(s.indicatorContrast, `${where}: focus outline of ${s.what} (${s.indicator})`).toBeGreaterThanOrEqual(3)
    if (modal) expect.soft(s.inside, `${where}: Tab left the dialog for ${s.what}`).toBe(true)
  }
  return stops
}

describe('booth screen accessibility', () => {
  it('the checks catch what they look for (a page with known faults)', async () => {
    const page = screen.page
    await page.setContent(`<!doctype html><html lang="en"><head><title>Known faults</title>
      <style>body { background: #0c1618; color: #fff } #dim:focus-visible { outline: 3px solid #35464a }</style></head>
      <body><main><h1>Known faults</h1>
        <p style="color: #35464a">Dark grey on near-black</p>
        <button id="unnamed" style="outline: none; width: 3rem; height: 3rem"></button>
        <input id="unlabelled">
        <button id="dim">Dim focus ring</button>
        <div id="dlg" role="dialog" aria-modal="true" aria-label="Leaky dialog"><button id="inside">Inside</button></div>
      </main></body></html>`)
    const r = await runAxe(page)
    expect(r.violations.map((v) => v.id)).toEqual(expect.arrayContaining(['color-contrast', 'button-name', 'label']))
    const stops = await tabThrough(page, { within: '#dlg' })
    expect(stops.map((s) => s.what)).toEqual(['button#unnamed', 'input#unlabelled', 'button#dim', 'button#inside'])
    expect(stops.find((s) => s.what === 'button#unnamed')!.visible).toBe(false)
    expect(stops.find((s) => s.what === 'button#dim')!.indicatorContrast).toBeLessThan(3)
    expect(stops.filter((s) => s.inside === false)).toHaveLength(3)
  })

  it('the pairing form passes axe and its controls are reachable with a visible focus', async () => {
    const page = screen.page
    await page.goto(`${app.url}/screen`)
    await page.getByTestId('pair-form').waitFor()
    await expectNoViolations(page, 'pairing form', ['label'])
    await expectKeyboardReach(page, '[data-testid=pair-form]', 'pairing form')
    // A wrong code is announced and tied to the field.
    await page.getByTestId('pair-code').fill('ZZZZZZ')
    await page.getByTestId('pair-submit').click()
    await page.getByRole('alert').waitFor()
    await expectNoViolations(page, 'pairing form with an error')
    await screenshot(page, 'a11y-pair-form-error')
  })

  it('the paired screen passes axe; every control is reachable by keyboard with a visible focus', async () => {
    const page = screen.page
    const manager = await app.as('manager')
    const boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
    const { code } = (await manager.post<{ code: string }>(`/api/booths/${boothId}/pairing-codes`)).body
    await page.getByTestId('pair-code').fill(code)
    await page.getByTestId('pair-submit').click()
    await page.getByTestId('screen-job-number').waitFor()
    await page.getByTestId('screen-value-air').getByText('21.0').waitFor({ timeout: 20_000 })
    await expectNoViolations(page, 'paired screen')
    const stops = await expectKeyboardReach(page, '[data-testid=booth-screen]', 'paired screen')
    expect(stops.map((s) => s.what)).toContain('button[action-start]')
    await screenshot(page, 'a11y-screen-paired')
  })

  it('the PIN dialog passes axe and works from the keyboard', async () => {
    const page = screen.page
    await page.getByTestId('action-start').focus()
    await page.keyboard.press('Enter')
    const dialog = page.getByTestId('pin-dialog')
    await dialog.waitFor()
    await expectNoViolations(page, 'PIN dialog')
    // Each dialog is named by its heading (aria-labelledby), so a screen reader says what it is for.
    expect(await page.getByRole('dialog', { name: /your PIN|Who is this/ }).count()).toBe(1)
    await expectKeyboardReach(page, '[data-testid=pin-dialog]', 'PIN dialog', true)
    await screenshot(page, 'a11y-pin-dialog')
    // The PIN typed on a keyboard (the dialog takes digits and Enter) starts the coat.
    if (await page.getByTestId('person-4').isVisible().catch(() => false)) await page.getByTestId('person-4').click()
    await dialog.getByTestId('pin-display').waitFor()
    await page.keyboard.type('2468')
    await page.keyboard.press('Enter')
    await page.getByTestId('coat-in-progress').waitFor({ timeout: 20_000 })
  })

  it('a coat in progress and the mix dialog pass axe', async () => {
    const page = screen.page
    await expectNoViolations(page, 'coat in progress')
    await expectKeyboardReach(page, '[data-testid=booth-screen]', 'coat in progress')
    await screenshot(page, 'a11y-coat-in-progress')
    // The mix dialog opened from the keyboard takes the focus, keeps it, closes with Escape and gives it back.
    const mix = page.getByTestId('action-mix')
    await mix.focus()
    await page.keyboard.press('Enter')
    await page.getByTestId('mix-dialog').waitFor()
    expect(await page.evaluate(() => !!document.activeElement?.closest('[data-testid=mix-dialog]'))).toBe(true)
    await expectNoViolations(page, 'mix dialog')
    expect(await page.getByRole('dialog', { name: 'Log a mix' }).count()).toBe(1)
    await expectKeyboardReach(page, '[data-testid=mix-dialog]', 'mix dialog', true)
    await screenshot(page, 'a11y-mix-dialog')
    await page.keyboard.press('Escape')
    await page.getByTestId('mix-dialog').waitFor({ state: 'detached', timeout: 5_000 })
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('action-mix')
    await page.getByTestId('action-finish').click()
    await page.getByTestId('flash-panel').waitFor({ timeout: 20_000 })
    await expectNoViolations(page, 'flash countdown')
    await screenshot(page, 'a11y-flash-countdown')

    // Starting the next coat before the flash is over asks for a reason in a dialog: same rules.
    await page.getByTestId('action-start').focus()
    await page.keyboard.press('Enter')
    const reason = page.getByTestId('reason-dialog')
    await reason.waitFor()
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('reason-input')
    await expectNoViolations(page, 'reason dialog', ['label'])
    expect(await page.getByRole('dialog', { name: 'Start anyway?' }).count()).toBe(1)
    await expectKeyboardReach(page, '[data-testid=reason-dialog]', 'reason dialog', true)
    await screenshot(page, 'a11y-reason-dialog')
    await page.keyboard.press('Escape')
    await reason.waitFor({ state: 'detached', timeout: 5_000 })
  })

  it('the same screen opened by signed-in staff (/screen/:id) passes axe', async () => {
    const staff = await openBrowser({ width: 1600, height: 1000 })
    try {
      const page = staff.page
      const boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
      await signIn(page, app.url, 'manager@larkspur.example', DEMO_PASSWORD)
      await page.goto(`${app.url}/screen/${boothId}`)
      await page.getByTestId('screen-job-number').waitFor({ timeout: 20_000 })
      await page.getByTestId('screen-value-air').getByText('21.0').waitFor({ timeout: 20_000 })
      await expectNoViolations(page, 'staff screen')
      await expectKeyboardReach(page, '[data-testid=booth-screen]', 'staff screen')
      await screenshot(page, 'a11y-staff-screen')
    } finally {
      await staff.close()
    }
  })
})
