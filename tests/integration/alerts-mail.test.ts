import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { MqttClient } from 'mqtt'
import { freePort } from '../../scripts/lib/ports'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'
import { parsedMessages, parseMail, startSmtpSink, toAddresses, type SmtpSink } from '../support/smtp'

// Alert e-mail end to end: outbox → nodemailer → the local SMTP sink (started here on a free port, SMTP_URL points
// at it), parsed with mailparser. The sink starts only after the first alert opened: the mail must wait and
// arrive later.

const S = 1000
const MIN = 60 * S
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

let app: TestApp
let manager: ApiClient
let smtpPort: number
let sink: SmtpSink | undefined
let mailDir: string
const ids: Record<string, number> = {}
const devices: Record<string, MqttClient> = {}

async function device(booth: string): Promise<MqttClient> {
  if (!devices[booth] || !devices[booth].connected) devices[booth] = await connectDevice(app.mqttUrl, booth)
  return devices[booth]
}

async function setWatches(boothId: number, watches: unknown[]) {
  const r = await manager.request('PUT', `/api/watches/${boothId}`, { watches })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
}

async function setMode(booth: string, mode: string, tsMs: number) {
  const c = await device(booth)
  await c.publishAsync(topicOf(booth, 'mode'), JSON.stringify({ ts: new Date(tsMs).toISOString(), mode }), { qos: 1 })
  await waitUntil(() => app.db.selectFrom('booth_modes').select('mode').where('booth_id', '=', ids[booth]!).where('ts', '=', new Date(tsMs)).executeTakeFirst())
}

async function publish(booth: string, points: { t: number; extra?: Record<string, unknown> }[]) {
  const c = await device(booth)
  for (const p of points) await c.publishAsync(topicOf(booth), reading(p.t, p.extra), { qos: 1 })
}

const series = (from: number, to: number, step: number, extra: Record<string, unknown>) => {
  const out: { t: number; extra: Record<string, unknown> }[] = []
  for (let t = from; t <= to; t += step) out.push({ t, extra })
  return out
}

async function openAlert(booth: string, ruleId: string) {
  return waitUntil(() => app.db.selectFrom('alerts').selectAll().where('booth_id', '=', ids[booth]!).where('rule_id', '=', ruleId).where('state', '<>', 'resolved').executeTakeFirst())
}

beforeAll(async () => {
  smtpPort = await freePort()
  mailDir = mkdtempSync(join(tmpdir(), 'boothbeat-mailbox-'))
  app = await startTestApp({
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    MAIL_FROM: 'Boothbeat test <alerts@boothbeat.test>',
    ALERT_ESCALATE_AFTER_SEC: '2',
    ALERT_ESCALATE_MAX: '1',
    ALERT_DIGEST_AFTER: '3',
    ALERT_DIGEST_WINDOW_SEC: '6',
    ALERT_RATE_LIMIT_SEC: '600',
    OUTBOX_RETRY_BASE_SEC: '0.5',
    OUTBOX_RETRY_MAX_SEC: '1',
    MAILBOX_DIR: mailDir,
    MAILBOX_PAGE: '1',
  })
  await waitUntil(async () => {
    const h = (await (await fetch(`${app.url}/api/health`)).json()) as { components?: { alerts?: { up?: boolean } } }
    return h.components?.alerts?.up === true
  }, 30_000)
  for (const b of await app.db.selectFrom('booths').select(['id', 'slug']).execute()) ids[b.slug] = b.id
  manager = await app.as('manager')
})

afterAll(async () => {
  for (const d of Object.values(devices)) await d.endAsync().catch(() => undefined)
  await sink?.close()
  await app?.close()
  rmSync(mailDir, { recursive: true, force: true })
})

describe('alert e-mail through the outbox', () => {
  let alertId = 0

  it('keeps the mail while the SMTP server is down and delivers it once it is up', async () => {
    const T = Date.now() - 20 * MIN
    await setWatches(ids['downdraft-1']!, [
      { id: 'condensation', kind: 'dew_point_margin', openAfterMs: 10_000, recipients: ['QA.Lead@inspector.example'] },
    ])
    await setMode('downdraft-1', 'spray', T - S)
    // 21 °C air at 95 % RH: dew point ≈ 20.1 °C; the panel at 20.8 °C is 0.7 °C above it.
    await publish('downdraft-1', series(T, T + 15 * S, 5 * S, { airTempC: 21, rhPct: 95, panelTempC: 20.8 }))
    const alert = await openAlert('downdraft-1', 'condensation')
    alertId = alert.id
    expect(alert).toMatchObject({ kind: 'dew_point_margin', severity: 'critical' })

    // The SMTP server is not there: the mail stays in the outbox, retried with a growing delay.
    const failing = await waitUntil(async () => {
      const row = await app.db.selectFrom('outbox').selectAll().where('alert_id', '=', alertId).where('kind', '=', 'alert').executeTakeFirst()
      return row && row.attempts >= 2 && row.last_error ? row : undefined
    }, 20_000)
    expect(failing.state).toBe('queued')
    expect(failing.last_error).toMatch(/ECONNREFUSED|connect/i)

    sink = await startSmtpSink({ host: '127.0.0.1', port: smtpPort, dir: mailDir })
    const msg = await sink.waitFor((m) => m.raw.includes(`X-Boothbeat-Alert: ${alertId}\r\n`) && m.raw.includes('X-Boothbeat-Kind: alert'), 20_000)
    const mail = await parseMail(msg)
    // Managers and admins (not the tech, painter or auditor) and the watch's extra recipient.
    expect(toAddresses(mail)).toEqual(['admin@larkspur.example', 'manager@larkspur.example', 'qa.lead@inspector.example'])
    expect(mail.from?.value[0]?.address).toBe('alerts@boothbeat.test')
    expect(mail.subject).toMatch(/^\[Critical\] Downdraft booth 1: Too close to dew point \(0\.\d °C\)$/)
    expect(mail.text).toContain('Booth: Downdraft booth 1 (Larkspur Collision & Refinish)')
    expect(mail.text).toMatch(/Value: 0\.\d °C/)
    expect(mail.text).toContain('Limit: 3.0 °C')
    expect(mail.text).toContain(`Since: ${new Date(T + 10 * S).toISOString().slice(0, 19).replace('T', ' ')} (UTC)`)
    expect(mail.text).toContain(`${app.url}/alerts/${alertId}`)
    expect(mail.text).toContain('Hold spraying until the booth is back in spec; follow the data sheet.')
    expect(typeof mail.html).toBe('string')
    expect(mail.html as string).toContain(`href="${app.url}/alerts/${alertId}"`)

    const row = await waitUntil(async () => {
      const r = await app.db.selectFrom('outbox').selectAll().where('id', '=', failing.id).executeTakeFirstOrThrow()
      return r.state === 'sent' ? r : undefined
    })
    expect(row.sent_at).toBeInstanceOf(Date)
    const detail = await manager.get<{ mails: { kind: string; state: string }[] }>(`/api/alerts/${alertId}`)
    expect(detail.body.mails).toEqual(expect.arrayContaining([expect.objectContaining({ kind: 'alert', state: 'sent' })]))
  })

  it('reminds again when nobody acknowledges it, and not after an acknowledgement', async () => {
    const reminder = await sink!.waitFor((m) => m.raw.includes(`X-Boothbeat-Alert: ${alertId}\r\n`) && m.raw.includes('X-Boothbeat-Kind: escalation'), 20_000)
    const mail = await parseMail(reminder)
    expect(mail.subject).toMatch(/^\[Not acknowledged\] Downdraft booth 1: Too close to dew point/)
    expect(mail.text).toMatch(/has not been acknowledged for \d+ s/)
    expect(toAddresses(mail)).toContain('manager@larkspur.example')
    // ALERT_ESCALATE_MAX=1: only one reminder.
    await sleep(4_000)
    const reminders = sink!.messages().filter((m) => m.raw.includes(`X-Boothbeat-Alert: ${alertId}\r\n`) && m.raw.includes('X-Boothbeat-Kind: escalation'))
    expect(reminders).toHaveLength(1)

    // An alert acknowledged at once gets no reminder.
    const T = Date.now() - 15 * MIN
    await setWatches(ids['prep-deck']!, [{ id: 'airflow', kind: 'airflow_min_in_spray' }])
    await setMode('prep-deck', 'spray', T - S)
    await publish('prep-deck', series(T, T + 20 * S, 5 * S, { airflowMps: 0.1 }))
    const a = await openAlert('prep-deck', 'airflow')
    expect((await (await app.as('tech')).post(`/api/alerts/${a.id}/acknowledge`, { note: 'on it' })).status).toBe(200)
    await sleep(5_000)
    const forIt = sink!.messages().filter((m) => m.raw.includes(`X-Boothbeat-Alert: ${a.id}\r\n`))
    expect(forIt.filter((m) => m.raw.includes('X-Boothbeat-Kind: escalation'))).toEqual([])
  })

  it('sends one digest instead of a storm when many alerts open at once', async () => {
    // Let the storm window (6 s) pass after the earlier mails.
    await sleep(7_000)
    const before = sink!.messages().length
    const T = Date.now() - 10 * MIN
    await setWatches(ids['downdraft-2']!, [
      { id: 'rh', kind: 'rh_band', openAfterMs: 0 },
      { id: 'temp', kind: 'air_temp_band', openAfterMs: 0 },
      { id: 'pressure', kind: 'booth_pressure_band', openAfterMs: 0 },
      { id: 'intake', kind: 'filter_dp_max', channel: 'intakeFilterDpPa', openAfterMs: 0 },
      { id: 'exhaust', kind: 'filter_dp_max', channel: 'exhaustFilterDpPa', params: { maxPa: 150 }, openAfterMs: 0 },
      { id: 'airflow', kind: 'airflow_min_in_spray', openAfterMs: 0 },
    ])
    await setMode('downdraft-2', 'spray', T - S)
    await publish('downdraft-2', [{ t: T, extra: { rhPct: 85, airTempC: 38, panelTempC: 30, boothDpPa: 40, intakeFilterDpPa: 400, exhaustFilterDpPa: 300, airflowMps: 0.05 } }])
    const rules = ['rh', 'temp', 'pressure', 'intake', 'exhaust', 'airflow']
    await waitUntil(async () => {
      const rows = await app.db.selectFrom('alerts').select('rule_id').where('booth_id', '=', ids['downdraft-2']!).where('state', '=', 'open').execute()
      return rows.length === rules.length
    })
    const alerts = await app.db.selectFrom('alerts').select(['id', 'rule_id']).where('booth_id', '=', ids['downdraft-2']!).execute()
    const alertIds = alerts.map((a) => a.id)

    // Three single mails at once, then one digest with the other three when the window ends.
    const digest = await sink!.waitFor((m) => m.raw.includes('X-Boothbeat-Kind: digest'), 20_000)
    const firsts = sink!.messages().slice(before).filter((m) => m.raw.includes('X-Boothbeat-Kind: alert') && alertIds.some((id) => m.raw.includes(`X-Boothbeat-Alert: ${id}\r\n`)))
    expect(firsts).toHaveLength(3)
    const parsed = await parseMail(digest)
    expect(parsed.subject).toBe('3 drift alerts at once: Downdraft booth 2')
    const inFirsts = new Set(firsts.map((m) => Number(/X-Boothbeat-Alert: (\d+)/.exec(m.raw)![1])))
    const inDigest = alertIds.filter((id) => parsed.text!.includes(`/alerts/${id}\n`) || parsed.text!.endsWith(`/alerts/${id}`))
    expect(inDigest).toHaveLength(3)
    expect(inDigest.some((id) => inFirsts.has(id))).toBe(false)
    expect(toAddresses(parsed)).toEqual(['admin@larkspur.example', 'manager@larkspur.example'])
    // No further single mails for these alerts.
    await sleep(2_000)
    const singles = sink!.messages().filter((m) => m.raw.includes('X-Boothbeat-Kind: alert') && alertIds.some((id) => m.raw.includes(`X-Boothbeat-Alert: ${id}\r\n`)))
    expect(singles).toHaveLength(3)
  })

  it('rate-limits a flapping watch to one mail', async () => {
    await sleep(7_000)
    const T = Date.now() - 8 * MIN
    await setWatches(ids['downdraft-1']!, [{ id: 'flappy', kind: 'rh_band', openAfterMs: 0, clearAfterMs: 0, hysteresis: 0 }])
    await setMode('downdraft-1', 'spray', T - S)
    const ofWatch = () => app.db.selectFrom('alerts').select(['id', 'state', 'notify_state']).where('booth_id', '=', ids['downdraft-1']!).where('rule_id', '=', 'flappy').orderBy('id').execute()
    const rh = (t: number, rhPct: number) => ({ t, extra: { rhPct, airTempC: 21, panelTempC: 20.8 } })
    await publish('downdraft-1', [rh(T, 80)])
    await waitUntil(async () => (await ofWatch())[0]?.notify_state === 'sent')
    // In, out again: a second alert of the same watch within the rate limit is not mailed now.
    await publish('downdraft-1', [rh(T + 5 * S, 55), rh(T + 10 * S, 80)])
    const rows = await waitUntil(async () => {
      const r = await ofWatch()
      return r.length === 2 && r[1]!.notify_state !== 'pending' ? r : undefined
    })
    expect(rows.map((r) => [r.state, r.notify_state])).toEqual([
      ['resolved', 'sent'],
      ['open', 'deferred'],
    ])
    await sleep(1_500)
    const mails = sink!.messages().filter((m) => rows.some((r) => m.raw.includes(`X-Boothbeat-Alert: ${r.id}\r\n`)) && m.raw.includes('X-Boothbeat-Kind: alert'))
    expect(mails).toHaveLength(1)
  })
})

describe('mailbox page', () => {
  it('lists and shows what the sink received, to admins only', async () => {
    const admin = await app.as('admin')
    const list = await admin.get<{ messages: { id: string; subject: string; to: string[] }[]; total: number }>('/api/mailbox')
    expect(list.status).toBe(200)
    expect(list.body.total).toBe(sink!.messages().length)
    const first = list.body.messages.find((m) => m.subject.includes('Too close to dew point'))!
    expect(first.to).toEqual(expect.arrayContaining(['manager@larkspur.example']))
    const one = await admin.get<{ message: { subject: string; text: string; html: string | null } }>(`/api/mailbox/${first.id}`)
    expect(one.status).toBe(200)
    expect(one.body.message.text).toContain('/alerts/')
    expect(one.body.message.html).toContain('<a href=')
    expect((await admin.get('/api/mailbox/..%2F..%2Fetc%2Fpasswd')).status).toBe(404)
    expect((await manager.get('/api/mailbox')).status).toBe(403)
    const page = await admin.get<string>(`/admin/mailbox?m=${encodeURIComponent(first.id)}`)
    expect(page.status).toBe(200)
    expect(page.body).toContain('data-testid="mailbox-row"')
    expect((await manager.get<string>('/admin/mailbox')).status).not.toBe(200)
    const all = await parsedMessages(sink!)
    expect(all.every((m) => typeof m.mail.text === 'string' && typeof m.mail.html === 'string')).toBe(true)
  })
})
