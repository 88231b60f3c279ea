import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { MqttClient } from 'mqtt'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { echoPageErrors, openBrowser, screenshot, signIn, type BrowserSession } from '../support/browser'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'
import { parseMail, startTestSink, toAddresses, type SmtpSink } from '../support/smtp'

// The manager's journey: enter a new revision of a data sheet, then the humidity of Downdraft booth 2 creeps up
// slowly (readings over MQTT) until the shop-default humidity drift watch (CUSUM: target 55 %, σ 1.5 %, k 0.5,
// h 5, 1-minute means, shared/watch/rules.ts) opens an alert well inside the 40–70 % band. Its e-mail reaches the
// local SMTP sink; the admin reads it on the Mailbox page (admins only); the manager follows the mail's link and
// acknowledges the alert.
//
// The ramp is sent as a backlog (16 minutes of readings, time-stamped in the past, sent at once), so the
// one-minute means close in seconds rather than minutes; the watches run in device time (server/alerts/runtime.ts).

const S = 1000
const MIN = 60 * S
const BOOTH = 'downdraft-2'
const PRODUCT = 'Waterborne basecoat, silver metallic'

let app: TestApp
let sink: SmtpSink
let mailDir: string
let managerBrowser: BrowserSession
let adminBrowser: BrowserSession
let device: MqttClient
let live: ReturnType<typeof setInterval> | undefined
let boothId: number
let alertId: number
let mailLink: string
let subject: string

beforeAll(async () => {
  mailDir = mkdtempSync(join(tmpdir(), 'boothbeat-mailbox-'))
  const started = await startTestSink({ dir: mailDir })
  sink = started.sink
  app = await startTestApp({ SMTP_URL: started.url, MAILBOX_DIR: mailDir, MAILBOX_PAGE: '1', MAIL_FROM: 'Boothbeat test <alerts@boothbeat.test>' })
  // Health is 200 once every announced component is up, the alerts area among them.
  await waitUntil(async () => {
    const h = (await (await fetch(`${app.url}/api/health`)).json()) as { components?: { alerts?: { up?: boolean } } }
    return h.components?.alerts?.up === true
  }, 30_000)
  boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', BOOTH).executeTakeFirstOrThrow()).id
  device = await connectDevice(app.mqttUrl, BOOTH)
  managerBrowser = await openBrowser({ width: 1400, height: 1000 })
  adminBrowser = await openBrowser({ width: 1400, height: 1000 })
  echoPageErrors(managerBrowser.page, 'manager')
  echoPageErrors(adminBrowser.page, 'admin')
}, 180_000)

afterAll(async () => {
  if (live) clearInterval(live)
  await device?.endAsync().catch(() => undefined)
  await managerBrowser?.close()
  await adminBrowser?.close()
  await sink?.close()
  await app?.close()
  rmSync(mailDir, { recursive: true, force: true })
})

describe('manager: spec revision and a humidity drift alert', () => {
  it('enters a new revision of a data sheet', async () => {
    const page = managerBrowser.page
    await signIn(page, app.url, 'manager@larkspur.example', DEMO_PASSWORD)
    await page.goto(`${app.url}/specs`)
    await page.getByRole('link', { name: PRODUCT }).click()
    await page.getByRole('heading', { name: PRODUCT, level: 1 }).waitFor()
    await page.getByRole('button', { name: 'New revision' }).click()
    const form = page.getByTestId('revision-form')
    await form.getByRole('heading', { name: 'New revision 2' }).waitFor()
    // A save without the flash times is refused field by field.
    await form.getByRole('button', { name: 'Save revision' }).click()
    await form.getByRole('alert').getByText('Some fields need attention.').waitFor()

    await form.getByLabel('Flash between coats, shortest').fill('4')
    await form.getByLabel('Flash between coats, longest').fill('8')
    await form.getByLabel('Flash before the next product').fill('12')
    await form.getByLabel('Lowest humidity').fill('40')
    await form.getByLabel('Highest humidity').fill('65')
    await form.getByLabel('Lowest air temperature').fill('15')
    await form.getByLabel('Highest air temperature').fill('32')
    await screenshot(page, 'manager-spec-revision-form')
    await form.getByRole('button', { name: 'Save revision' }).click()
    await page.getByRole('status').getByText('Revision 2 saved.').waitFor({ timeout: 15_000 })
    await page.getByRole('heading', { name: 'Revision 2', level: 2 }).waitFor()
    await screenshot(page, 'manager-spec-revision-saved')

    const product = await app.db.selectFrom('products').select('id').where('name', '=', PRODUCT).executeTakeFirstOrThrow()
    const rev = await app.db.selectFrom('spec_revisions').selectAll().where('product_id', '=', product.id).where('number', '=', 2).executeTakeFirstOrThrow()
    expect(rev).toMatchObject({ flash_min_minutes: 4, flash_max_minutes: 8, flash_before_next_minutes: 12, min_rh_pct: 40, max_rh_pct: 65, min_air_temp_c: 15, max_air_temp_c: 32 })
    expect(rev.frozen_at).toBeNull()
  })

  it('the humidity creeps up inside its band, the drift watch opens an alert and mails the managers', async () => {
    const T = Date.now() - 16 * MIN
    // Spray mode first: the drift watch applies while painting (spray, flash).
    await device.publishAsync(topicOf(BOOTH, 'mode'), JSON.stringify({ ts: new Date(T - S).toISOString(), mode: 'spray' }), { qos: 1 })
    await waitUntil(() => app.db.selectFrom('booth_modes').select('mode').where('booth_id', '=', boothId).where('ts', '=', new Date(T - S)).executeTakeFirst())
    // +0.25 %RH per minute from the 55 % target with a little alternating noise, one reading every 2 s (30 per
    // one-minute mean, the default minimum): 55 % → 59 %, never near the 70 % band limit.
    const rhAt = (t: number) => Math.round((55 + (0.25 * (t - T)) / MIN + ((Math.floor(t / (2 * S)) % 2) - 0.5) * 0.4) * 100) / 100
    let maxRh = 0
    for (let t = T; t <= T + 16 * MIN; t += 2 * S) {
      const rh = rhAt(t)
      maxRh = Math.max(maxRh, rh)
      await device.publishAsync(topicOf(BOOTH), reading(t, { rhPct: rh }), { qos: 1 })
    }
    expect(maxRh).toBeLessThan(60)
    // From now on the booth reports live, holding the last level, so no other watch (sensor silence) fires.
    live = setInterval(() => void device.publishAsync(topicOf(BOOTH), reading(Date.now(), { rhPct: 59 }), { qos: 1 }).catch(() => undefined), 2 * S)

    const alert = await waitUntil(
      () => app.db.selectFrom('alerts').selectAll().where('booth_id', '=', boothId).where('kind', '=', 'rh_cusum').executeTakeFirst(),
      60_000,
      250,
    )
    alertId = alert.id
    expect(alert).toMatchObject({ rule_id: 'rh-drift', state: 'open', limit_value: 55 })
    // A slow drift is caught after several minutes of evidence, not at the first reading.
    expect(alert.opened_at.getTime() - T).toBeGreaterThan(5 * MIN)
    expect(alert.message).toMatch(/drifting up/)
    expect(await app.db.selectFrom('alerts').select('id').where('booth_id', '=', boothId).where('kind', '=', 'rh_band').execute()).toEqual([])

    const msg = await sink.waitFor((m) => m.raw.includes(`X-Boothbeat-Alert: ${alertId}\r\n`) && m.raw.includes('X-Boothbeat-Kind: alert'), 60_000)
    const mail = await parseMail(msg)
    subject = mail.subject ?? ''
    expect(subject).toMatch(/^Downdraft booth 2: Humidity drift \(\d\d(\.\d)? %\)$/)
    expect(toAddresses(mail)).toEqual(['admin@larkspur.example', 'manager@larkspur.example'])
    expect(mail.text).toContain('A watch opened a drift alert.')
    mailLink = /Open the alert to acknowledge or resolve it: (\S+)/.exec(mail.text ?? '')?.[1] ?? ''
    expect(mailLink).toBe(`${app.url}/alerts/${alertId}`)
  })

  it('the admin reads the mail on the Mailbox page', async () => {
    const page = adminBrowser.page
    await signIn(page, app.url, 'admin@larkspur.example', DEMO_PASSWORD)
    await page.goto(`${app.url}/admin/mailbox`)
    const row = page.getByTestId('mailbox-row').filter({ hasText: subject })
    await row.waitFor({ timeout: 15_000 })
    expect(await row.textContent()).toContain('manager@larkspur.example')
    await row.click()
    const message = page.getByTestId('mailbox-message')
    await message.getByRole('heading', { name: subject }).waitFor()
    // The HTML part is shown in a sandboxed frame; its link goes to the alert.
    const frame = page.frameLocator('iframe[title="HTML part of the message"]')
    expect(await frame.getByRole('link', { name: 'Open the alert' }).getAttribute('href')).toBe(mailLink)
    await screenshot(page, 'admin-mailbox-drift-alert')
    await message.getByRole('button', { name: 'Plain text' }).click()
    await message.getByText(mailLink).waitFor()
    expect(await message.textContent()).toContain('Humidity is drifting away from its usual level')
  })

  it('the manager follows the link from the mail and acknowledges the alert', async () => {
    const page = managerBrowser.page
    await page.goto(mailLink)
    await page.getByRole('heading', { name: 'Humidity drift', level: 1 }).waitFor()
    expect(await page.getByTestId('alert-state').textContent()).toContain('Open')
    // The page lists the e-mail that went out for it.
    const mails = page.getByRole('region', { name: 'E-mails' })
    await mails.getByText(subject).waitFor()
    expect(await mails.textContent()).toContain('Sent')
    await screenshot(page, 'manager-alert-open')

    await page.getByRole('button', { name: 'Acknowledge' }).click()
    await page.getByLabel('Note (optional): what are you doing about it?').fill('Checking the make-up air unit humidifier')
    await page.getByRole('button', { name: 'Acknowledge' }).click()
    await page.getByTestId('alert-state').getByText('Acknowledged').waitFor({ timeout: 15_000 })
    await page.getByText('Acknowledged by Priya Fenwick: “Checking the make-up air unit humidifier”').waitFor()
    await screenshot(page, 'manager-alert-acknowledged')

    const stored = await app.db.selectFrom('alerts').select(['state', 'acknowledged_by', 'ack_note']).where('id', '=', alertId).executeTakeFirstOrThrow()
    const manager = await app.db.selectFrom('users').select('id').where('email', '=', 'manager@larkspur.example').executeTakeFirstOrThrow()
    expect(stored).toEqual({ state: 'acknowledged', acknowledged_by: manager.id, ack_note: 'Checking the make-up air unit humidifier' })
    const events = await app.db.selectFrom('event_log').select(['type', 'actor_label']).where('subject_type', '=', 'alert').where('subject_id', '=', String(alertId)).execute()
    expect(events).toContainEqual({ type: 'alert.acknowledged', actor_label: 'Priya Fenwick (manager)' })
  })
})
