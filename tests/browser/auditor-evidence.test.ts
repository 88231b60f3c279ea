import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import JSZip from 'jszip'
import { parse } from 'csv-parse/sync'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { echoPageErrors, openBrowser, screenshot, signIn, type BrowserSession } from '../support/browser'

// The auditor's journey: a finished job (two primer coats in Downdraft booth 2 two hours ago, entered by the
// painter, marked done by the manager, with the booth's stored readings around it); the auditor signs in, opens
// Evidence, picks the job, previews and downloads the evidence pack in Chromium. The test opens the zip (jszip, as
// tests/integration/evidence.test.ts does), checks every SHA-256 of the manifest against the files, and parses the
// CSV (csv-parse, RFC 4180).

const S = 1000
const MIN = 60 * S
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex')
const JOB = 'RO-24133'
const PRIMER = '2K high-build primer surfacer'

let app: TestApp
let browser: BrowserSession
let boothId: number
let jobId: number
const T0 = Math.floor((Date.now() - 2 * 60 * MIN) / MIN) * MIN
const READ_FROM = T0 - 30 * MIN
const READ_TO = T0 + 60 * MIN

beforeAll(async () => {
  app = await startTestApp()
  boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-2').executeTakeFirstOrThrow()).id

  // The booth's readings, stored: 19 °C, 55 %RH, every 10 s for 90 minutes.
  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  await ensurePartitions(app.pool, READ_FROM, READ_TO)
  const rows = []
  for (let t = READ_FROM; t < READ_TO; t += 10 * S) {
    rows.push({ boothId, tsMs: t, receivedMs: t, deviceId: 'larkspur-downdraft-2', seq: null, airTempC: 19, rhPct: 55, panelTempC: 18.6, airflowMps: 0.4, boothDpPa: 5, intakeFilterDpPa: 90, exhaustFilterDpPa: 120, heaterOn: false, dewPointC: 9.8 })
  }
  await insertReadingBatch(app.pool, rows)

  // The job: planned and finished by the manager, its coats entered afterwards by the painter.
  const manager = await app.as('manager')
  const painter = await app.as('painter')
  const rev = await app.db
    .selectFrom('spec_revisions')
    .innerJoin('products', 'products.id', 'spec_revisions.product_id')
    .select('spec_revisions.id')
    .where('products.name', '=', PRIMER)
    .orderBy('spec_revisions.number', 'desc')
    .executeTakeFirstOrThrow()
  const created = await manager.post<{ job: { id: number } }>('/api/jobs', {
    number: JOB,
    vehicle: 'Estate car, tailgate (invented)',
    colourCode: 'GRN-11',
    boothId,
    steps: [{ revisionId: rev.id, coatsPlanned: 2 }],
  })
  expect(created.status, JSON.stringify(created.body)).toBe(201)
  jobId = created.body.job.id
  const stepId = (await manager.get<{ steps: { id: number }[] }>(`/api/jobs/${jobId}`)).body.steps[0]!.id
  const at = (ms: number) => new Date(ms).toISOString()
  for (const [n, start, end] of [
    [1, T0, T0 + 4 * MIN],
    [2, T0 + 12 * MIN, T0 + 16 * MIN],
  ] as const) {
    const c = await painter.post<{ coat: { id: number } }>('/api/coats', { jobId, stepId, coatNumber: n, at: at(start) })
    expect(c.status, JSON.stringify(c.body)).toBe(201)
    expect((await painter.post(`/api/coats/${c.body.coat.id}/finish`, { at: at(end) })).status).toBe(200)
  }
  const done = await manager.patch(`/api/jobs/${jobId}`, { status: 'done' })
  expect(done.status, JSON.stringify(done.body)).toBe(200)

  browser = await openBrowser({ width: 1400, height: 1100 })
  echoPageErrors(browser.page, 'auditor')
}, 180_000)

afterAll(async () => {
  await browser?.close()
  await app?.close()
})

describe('auditor: evidence pack', () => {
  let zipPath = ''

  it('signs in, picks the finished job on Evidence, previews and downloads the pack', async () => {
    const page = browser.page
    await signIn(page, app.url, 'auditor@larkspur.example', DEMO_PASSWORD)
    // Exports are the auditor's main page: sign-in lands there.
    await page.waitForURL(`${app.url}/evidence`)
    await page.getByRole('heading', { name: 'Evidence', level: 1 }).waitFor()
    const jobSelect = page.getByTestId('evidence-job')
    // Only finished jobs are offered by default: the demo job still in the booth is not among them.
    const options = await jobSelect.locator('option').allTextContents()
    expect(options.some((o) => o.startsWith(`${JOB} `))).toBe(true)
    expect(options.some((o) => o.startsWith('RO-24117'))).toBe(false)
    await jobSelect.selectOption({ value: String(jobId) })
    await page.getByRole('button', { name: 'Preview' }).click()
    const preview = page.getByTestId('pack-preview')
    await preview.waitFor({ timeout: 30_000 })
    expect(await preview.textContent()).toContain(JOB)
    await screenshot(page, 'auditor-evidence-preview')

    const [download] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.getByTestId('download-pack').click()])
    expect(download.suggestedFilename()).toBe(`evidence-${JOB}.zip`)
    zipPath = join(app.dir, download.suggestedFilename())
    await download.saveAs(zipPath)
    expect(await download.failure()).toBeNull()
    // The export is recorded and listed on the page once the download has finished.
    await page.getByTestId('export-history').getByRole('cell', { name: `evidence-${JOB}.zip` }).waitFor({ timeout: 20_000 })
    await screenshot(page, 'auditor-evidence-downloaded')
  })

  it('holds a manifest whose SHA-256 values match the files, and a CSV that parses', async () => {
    const raw = readFileSync(zipPath)
    // A zip starts with a local file header, "PK\3\4" (PKWARE APPNOTE.TXT 4.3.7).
    expect([...raw.subarray(0, 4)]).toEqual([0x50, 0x4b, 0x03, 0x04])
    const zip = await JSZip.loadAsync(raw)
    expect(Object.keys(zip.files)).toEqual(['report.pdf', 'environment-log.csv', 'manifest.json'])
    const manifestBytes = await zip.file('manifest.json')!.async('uint8array')
    const manifest = JSON.parse(Buffer.from(manifestBytes).toString('utf8')) as {
      exportId: string
      scope: { kind: string; jobId: number; jobNumber: string }
      generatedBy: { name: string; role: string }
      files: { name: string; sha256: string; bytes: number }[]
      counts: { readings: number; coats: number }
      period: { from: string; to: string }
    }
    expect(manifest.scope).toMatchObject({ kind: 'job', jobId, jobNumber: JOB })
    expect(manifest.generatedBy).toMatchObject({ name: 'Odette Brackwater', role: 'auditor' })
    expect(manifest.files.map((f) => f.name).sort()).toEqual(['environment-log.csv', 'report.pdf'])
    for (const f of manifest.files) {
      const bytes = await zip.file(f.name)!.async('uint8array')
      expect(f.sha256, f.name).toMatch(/^[0-9a-f]{64}$/)
      expect(sha256(bytes), f.name).toBe(f.sha256)
      expect(bytes.length, f.name).toBe(f.bytes)
    }
    expect(manifest.counts.coats).toBe(2)

    const csv = Buffer.from(await zip.file('environment-log.csv')!.async('uint8array')).toString('utf8')
    const records = parse(csv, { bom: true, columns: true, record_delimiter: '\r\n' }) as Record<string, string>[]
    // Units stand in the header (no calibration here, so no raw column).
    expect(Object.keys(records[0] ?? {})).toEqual(expect.arrayContaining(['time_utc [ISO 8601]', 'booth', 'air_temp_c [°C]', 'rh_pct [%]', 'dew_point_c [°C]', 'heater_on [true/false]']))
    expect(records.length).toBe(manifest.counts.readings)
    expect(records.length).toBeGreaterThan(0)
    // Every row lies in the pack's period, in time order, with the stored values.
    const times = records.map((r) => Date.parse(r['time_utc [ISO 8601]']!))
    expect(times.every((t) => t >= Date.parse(manifest.period.from) && t < Date.parse(manifest.period.to))).toBe(true)
    expect(times.every((t, i) => i === 0 || t > times[i - 1]!)).toBe(true)
    expect(records.every((r) => Number(r['rh_pct [%]']) === 55 && Number(r['air_temp_c [°C]']) === 19 && r.booth === 'downdraft-2')).toBe(true)
    const stored = await app.db
      .selectFrom('readings')
      .select((eb) => eb.fn.countAll<string>().as('n'))
      .where('booth_id', '=', boothId)
      .where('ts', '>=', new Date(manifest.period.from))
      .where('ts', '<', new Date(manifest.period.to))
      .executeTakeFirstOrThrow()
    expect(records.length).toBe(Number(stored.n))

    // The download is in the event log with the hash of this manifest.
    const ev = await app.db.selectFrom('event_log').select(['actor_label', 'payload']).where('type', '=', 'evidence.exported').orderBy('seq', 'desc').executeTakeFirstOrThrow()
    expect(ev.actor_label).toBe('Odette Brackwater (auditor)')
    expect(JSON.parse(ev.payload)).toMatchObject({ exportId: manifest.exportId, kind: 'pack', jobId, manifestSha256: sha256(manifestBytes) })
  })
})
