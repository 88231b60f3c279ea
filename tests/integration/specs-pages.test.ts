import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { writeFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, SCREENSHOT_DIR, type BrowserSession } from '../support/browser'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'

// The spec sheet pages in Debian's Chromium: list, detail with the 2K caution, a °F edit that is
// stored in °C, the preview reacting to typed conditions, and a refused upload.
let app: TestApp
let browser: BrowserSession
beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  browser = await openBrowser({ width: 1400, height: 1000 })
  mkdirSync(SCREENSHOT_DIR, { recursive: true })
})
afterAll(async () => {
  await browser?.close()
  await app?.close()
})

async function signIn(local: string) {
  const page = browser.page
  await page.goto(`${app.url}/login`)
  await page.getByLabel('E-mail').fill(`${local}@larkspur.example`)
  await page.getByLabel('Password').fill(DEMO_PASSWORD)
  await page.getByRole('button', { name: /sign in/i }).click()
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
}

describe('spec sheet pages', () => {
  it('lists products and shows a 2K product with its caution, preview and data sheet', async () => {
    const page = browser.page
    await signIn('manager')
    await page.goto(`${app.url}/specs`)
    await expect.poll(() => page.getByTestId('product-list').textContent()).toContain('2K high-solids clearcoat')
    await page.screenshot({ path: `${SCREENSHOT_DIR}/specs-list.png`, fullPage: true })
    await page.getByRole('link', { name: '2K high-build primer surfacer' }).click()
    await page.waitForURL(/\/specs\/\d+/)
    await expect.poll(() => page.getByTestId('safety-caution').textContent()).toMatch(/isocyanates/)
    await expect.poll(() => page.getByTestId('spec-preview').textContent(), { timeout: 10_000 }).toMatch(/At other conditions[\s\S]*Flash between coats/)
    await page.screenshot({ path: `${SCREENSHOT_DIR}/specs-detail.png`, fullPage: true })
  })

  it('edits in °F, stores °C, shows inline messages, and the preview follows typed conditions', async () => {
    const page = browser.page
    const product = await app.db.selectFrom('products').select('id').where('name', '=', '2K high-solids clearcoat').executeTakeFirstOrThrow()
    const rev = await app.db.selectFrom('spec_revisions').select('id').where('product_id', '=', product.id).executeTakeFirstOrThrow()
    await page.goto(`${app.url}/specs/${product.id}`)
    const preview = page.getByTestId('spec-preview')
    const flashCell = preview.getByRole('row', { name: /Flash between coats/ }).getByTestId('preview-now')
    await expect.poll(() => flashCell.textContent(), { timeout: 10_000 }).toMatch(/min/)
    const cold = await flashCell.textContent()
    await preview.getByLabel('Air temperature').fill('28')
    await expect.poll(() => flashCell.textContent(), { timeout: 10_000 }).not.toBe(cold)

    await page.getByRole('button', { name: 'Edit', exact: true }).click()
    const form = page.getByTestId('revision-form')
    await form.getByRole('button', { name: '°F' }).click()
    await expect.poll(() => form.getByLabel('Reference temperature').inputValue()).toBe('68')
    // The preview types and speaks in the form's unit while editing: 28 °C became 82.4 °F.
    await expect.poll(() => preview.getByLabel('Air temperature').inputValue()).toBe('82.4')
    await expect.poll(() => preview.textContent(), { timeout: 10_000 }).toMatch(/At 82\.4\s°F/)
    await form.getByLabel('Number of coats').fill('9')
    await form.getByRole('button', { name: 'Save revision' }).click()
    await expect.poll(() => form.textContent()).toContain('The number of coats must be between 1 and 6')
    await form.getByLabel('Number of coats').fill('3')
    await page.screenshot({ path: `${SCREENSHOT_DIR}/specs-edit.png`, fullPage: true })
    await form.getByRole('button', { name: 'Save revision' }).click()
    await expect.poll(() => page.getByText('Revision 1 updated.').count()).toBe(1)
    const stored = await app.db.selectFrom('spec_revisions').select(['coats', 'ref_temp_c', 'bake_schedules']).where('id', '=', rev.id).executeTakeFirstOrThrow()
    expect(stored.coats).toBe(3)
    expect(stored.ref_temp_c).toBeCloseTo(20, 6)
    expect(stored.bake_schedules[0]!.objectTempC).toBeCloseTo(60, 6)
  })

  it('uploads a data sheet with a clear refusal for a non-PDF, and hides writing from a painter', async () => {
    const page = browser.page
    const product = await app.db.selectFrom('products').select('id').where('name', '=', 'Clear binder wet bed').executeTakeFirstOrThrow()
    await page.goto(`${app.url}/specs/${product.id}`)
    const upload = page.getByTestId('tds-upload')
    const fake = join(app.dir, 'not-really.pdf')
    writeFileSync(fake, '<html>hello</html>')
    await upload.locator('input[type=file]').setInputFiles(fake)
    await expect.poll(() => upload.getByRole('alert').textContent()).toMatch(/not a PDF/)
    const real = join(app.dir, 'Binder TDS.pdf')
    writeFileSync(real, '%PDF-1.4\n1 0 obj << >> endobj\ntrailer << >>\n%%EOF\n')
    await upload.locator('input[type=file]').setInputFiles(real)
    await expect.poll(() => upload.textContent(), { timeout: 10_000 }).toContain('Data sheet attached.')
    await expect.poll(() => upload.getByRole('link', { name: 'Binder TDS.pdf' }).count()).toBe(1)

    await page.context().clearCookies()
    await signIn('painter')
    await page.goto(`${app.url}/specs`)
    await expect.poll(() => page.getByTestId('product-list').textContent()).toContain('Clear binder wet bed')
    expect(await page.getByRole('button', { name: 'New product' }).count()).toBe(0)
    await page.goto(`${app.url}/specs/${product.id}`)
    await expect.poll(() => page.getByTestId('revision-details').count()).toBe(1)
    expect(await page.getByRole('button', { name: 'Edit', exact: true }).count()).toBe(0)
    expect(await page.getByTestId('tds-upload').locator('input[type=file]').count()).toBe(0)
    expect(await page.getByTestId('tds-upload').getByRole('link', { name: 'Binder TDS.pdf' }).count()).toBe(1)
  })
})
