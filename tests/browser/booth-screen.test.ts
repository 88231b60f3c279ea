import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { MqttClient } from 'mqtt'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { openBrowser, screenshot, type BrowserSession } from '../support/browser'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'

// A painter on a paired booth screen sprays the wet bed of the demo job, sees the flash countdown,
// the booth warms up (readings through MQTT), the estimate moves earlier and the screen turns ready.
// A manager's dashboard shows every booth live with the job and its countdown.
let app: TestApp
let screenBrowser: BrowserSession
let managerBrowser: BrowserSession
const devices: MqttClient[] = []
const BOOTHS = ['downdraft-1', 'downdraft-2', 'prep-deck'] as const
const REFERENCE = { airTempC: 20, rhPct: 50, panelTempC: 20, airflowMps: 0.3 }
const conditions: Record<string, Record<string, number>> = Object.fromEntries(BOOTHS.map((b) => [b, { ...REFERENCE }]))
let publisher: ReturnType<typeof setInterval> | undefined
const MIN = 60_000

beforeAll(async () => {
  app = await startTestApp()
  const booth1 = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
  // The last hour of readings, stored, so the primer coats entered afterwards have their flash behind them.
  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  const now = Date.now()
  await ensurePartitions(app.pool, now - 86_400_000, now + 86_400_000)
  const rows = []
  for (let t = now - 70 * MIN; t < now - 30_000; t += 10_000) {
    rows.push({ boothId: booth1, tsMs: t, receivedMs: t, deviceId: 'larkspur-downdraft-1', seq: null, ...REFERENCE, boothDpPa: 6, intakeFilterDpPa: null, exhaustFilterDpPa: null, heaterOn: false, dewPointC: 9.26 })
  }
  await insertReadingBatch(app.pool, rows)
  // Live readings from every booth, once a second.
  for (const b of BOOTHS) devices.push(await connectDevice(app.mqttUrl, b))
  let seq = 0
  publisher = setInterval(() => {
    seq++
    BOOTHS.forEach((b, i) => devices[i]!.publish(topicOf(b), reading(Date.now(), { ...conditions[b], seq }), { qos: 1 }))
  }, 1_000)

  // The primer (2 coats) was sprayed earlier and entered afterwards by the painter.
  const painter = await app.as('painter')
  type Detail = { job: { id: number }; steps: { id: number }[] }
  const jobId = (await app.db.selectFrom('jobs').select('id').where('number', '=', 'RO-24117').executeTakeFirstOrThrow()).id
  const d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
  const at = (ms: number) => new Date(now - ms).toISOString()
  for (const [n, start, end] of [
    [1, 60 * MIN, 58 * MIN],
    [2, 50 * MIN, 48 * MIN],
  ] as const) {
    const s = await painter.post<{ coat: { id: number } }>('/api/coats', { jobId: d.job.id, stepId: d.steps[0]!.id, coatNumber: n, at: at(start) })
    expect(s.status, JSON.stringify(s.body)).toBe(201)
    expect((await painter.post(`/api/coats/${s.body.coat.id}/finish`, { at: at(end) })).status).toBe(200)
  }
  screenBrowser = await openBrowser({ width: 1600, height: 1000 })
  managerBrowser = await openBrowser({ width: 1400, height: 1000 })
}, 240_000)

afterAll(async () => {
  if (publisher) clearInterval(publisher)
  for (const d of devices) d.end(true)
  await screenBrowser?.close()
  await managerBrowser?.close()
  await app?.close()
})

describe('booth screen', () => {
  it('pairs, records a coat with the painter PIN, counts the flash down and turns ready sooner when the booth warms up', async () => {
    const page = screenBrowser.page
    const manager = await app.as('manager')
    const booth1 = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
    const { code } = (await manager.post<{ code: string }>(`/api/booths/${booth1}/pairing-codes`)).body

    await page.goto(`${app.url}/screen`)
    await page.getByTestId('pair-code').fill(code)
    await page.getByTestId('pair-submit').click()
    await page.getByTestId('screen-job-number').waitFor()
    expect(await page.getByTestId('screen-job-number').textContent()).toBe('RO-24117')
    await page.getByTestId('next-coat').getByText('Clear binder wet bed').waitFor()
    // Touch targets for gloved hands: at least 64 px high.
    const startBox = await page.getByTestId('action-start').boundingBox()
    expect(startBox!.height).toBeGreaterThanOrEqual(64)
    await page.getByTestId('cautions').getByText('supplied-air respiratory protection').waitFor()
    await page.getByTestId('screen-value-air').getByText('20.0').waitFor()
    await screenshot(page, 'booth-screen-paired')

    // Start the wet bed: the painter (assigned to the job, so already chosen) types the PIN.
    await page.getByTestId('action-start').click()
    await page.getByTestId('pin-dialog').waitFor()
    if (await page.getByTestId('person-4').isVisible().catch(() => false)) await page.getByTestId('person-4').click()
    for (const d of '2468') await page.getByTestId(`pin-key-${d}`).click()
    await page.getByTestId('pin-ok').click()
    await page.getByTestId('coat-in-progress').waitFor()
    expect(await page.getByTestId('screen-actor').textContent()).toContain('Jun Halloway')
    await screenshot(page, 'booth-screen-spraying')

    // Finish it (the painter stays identified for a moment): the flash countdown starts.
    await page.getByTestId('action-finish').click()
    const panel = page.getByTestId('flash-panel')
    await panel.waitFor()
    expect(await panel.getAttribute('data-ready')).toBe('false')
    const first = Number(await panel.getAttribute('data-ready-at'))
    const coat = await app.db.selectFrom('coats').select(['finished_at', 'painter_id']).orderBy('id', 'desc').executeTakeFirstOrThrow()
    const finished = coat.finished_at!.getTime()
    // The wet bed flashes 1 min at 20 °C / 50 % / 0.3 m/s before the next product.
    expect(Math.abs(first - (finished + MIN))).toBeLessThan(3_000)
    expect(coat.painter_id).toBe((await app.db.selectFrom('users').select('id').where('email', '=', 'painter@larkspur.example').executeTakeFirstOrThrow()).id)
    await page.getByTestId('flash-countdown').getByText(/^\d+:\d\d$/).waitFor()
    await screenshot(page, 'booth-screen-countdown')

    // Warmer, drier air (panel warm too): a waterborne flash speeds up (VPD ≈ 2.5× the reference).
    conditions['downdraft-1'] = { airTempC: 30, rhPct: 30, panelTempC: 29, airflowMps: 0.3 }
    const earlier = await waitUntil(async () => {
      const v = Number(await panel.getAttribute('data-ready-at'))
      return v > 0 && v < first - 10_000 ? v : false
    }, 20_000, 250)
    expect(earlier).toBeLessThan(first - 10_000)
    await page.getByTestId('screen-value-air').getByText('30.0').waitFor()
    await screenshot(page, 'booth-screen-warmer')

    await waitUntil(async () => (await panel.getAttribute('data-ready')) === 'true', 60_000, 250)
    await page.getByTestId('flash-ready').waitFor()
    expect(await page.getByTestId('flash-ready').textContent()).toMatch(/ready/i)
    // Ready before the first estimate.
    expect(Date.now()).toBeLessThan(first + 2_000)
    await screenshot(page, 'booth-screen-ready')
  })

  it("shows every booth live on a manager's dashboard, with the job and its countdown", async () => {
    const page = managerBrowser.page
    page.on('console', (m) => {
      if (m.type() === 'error') console.log('[browser]', m.text())
    })
    await page.goto(`${app.url}/login`)
    await page.locator('#login-email').waitFor({ timeout: 15_000 }).catch(async (e: unknown) => {
      await screenshot(page, 'dashboard-login-failure')
      console.log((await page.content()).slice(0, 3000))
      throw e
    })
    await page.locator('#login-email').fill('manager@larkspur.example')
    await page.locator('#login-password').fill(DEMO_PASSWORD)
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(`${app.url}/`)
    const tiles = page.getByTestId('booth-tile')
    await waitUntil(async () => (await tiles.count()) === 3, 20_000, 200)
    await waitUntil(async () => {
      const states = await tiles.evaluateAll((els) => els.map((e) => e.getAttribute('data-state')))
      return states.every((s) => s === 'ok')
    }, 20_000, 250)
    const withJob = page.getByTestId('tile-job-number')
    await withJob.first().waitFor()
    expect(await withJob.allTextContents()).toEqual(['RO-24117'])
    await page.getByTestId('tile-job-detail').first().waitFor()
    expect(await page.getByTestId('tile-job-detail').first().textContent()).toMatch(/Ready for Waterborne basecoat|Flash-off/)
    expect(await page.getByRole('link', { name: 'Booth screens' }).count()).toBe(1)
    await screenshot(page, 'dashboard-live')
  })

  it('lets the manager follow the job: list, coat history with flash waited vs required, and a new job with its finish plan', async () => {
    const page = managerBrowser.page
    await page.goto(`${app.url}/jobs`)
    await page.getByTestId('jobs-table').waitFor()
    expect(await page.getByTestId('job-row').count()).toBe(2)
    await page.getByRole('link', { name: 'RO-24117' }).click()
    await page.getByTestId('coat-history').waitFor()
    expect(await page.getByTestId('coat-row').count()).toBe(3)
    expect(await page.getByTestId('coat-history').textContent()).toMatch(/before the next product/)
    await screenshot(page, 'jobs-detail')

    await page.goto(`${app.url}/jobs/new`)
    await page.locator('#job-number').fill('RO-24130')
    await page.locator('#job-vehicle').fill('Small city car, bonnet')
    await page.locator('#job-colour').fill('RED-03')
    await page.locator('#plan-add').selectOption({ label: '2K high-solids clearcoat · rev. 1' })
    await page.getByRole('button', { name: 'Add step' }).click()
    expect(await page.getByTestId('plan-step').count()).toBe(1)
    await screenshot(page, 'jobs-new')
    await page.getByRole('button', { name: 'Create job' }).click()
    await page.waitForURL(/\/jobs\/\d+$/)
    await page.getByTestId('job-number').getByText('RO-24130').waitFor()
    const created = await app.db.selectFrom('jobs').select('id').where('number', '=', 'RO-24130').executeTakeFirstOrThrow()
    const steps = await app.db.selectFrom('job_steps').selectAll().where('job_id', '=', created.id).execute()
    expect(steps.map((s) => s.coats_planned)).toEqual([2])
  })
})
