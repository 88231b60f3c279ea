import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import JSZip from 'jszip'
import { parse } from 'csv-parse/sync'
import { PDFParse } from 'pdf-parse'
import { dewPointC } from '#shared/cure/psychrometrics'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'

// Evidence packs against the built server: a job sprayed in a known, steady booth (17 °C / 64 % RH, air
// sensor calibrated +0.5 °C), then the zip, the CSV, the PDF text, the manifest hashes and the records.
let app: TestApp
let boothId: number
let jobId: number
let auditor: ApiClient
const sha = (b: Uint8Array | string) => createHash('sha256').update(b).digest('hex')
const MIN = 60_000
// Two days back on a whole hour, so the whole scenario lies in the past.
const T0 = Math.floor((Date.now() - 2 * 86_400_000) / 3_600_000) * 3_600_000
const READ_FROM = T0 - 20 * MIN
const READ_TO = T0 + 120 * MIN
const BAKE = { from: T0 + 40 * MIN, to: T0 + 90 * MIN }
// A job pack covers 15 min before its first coat to 15 min after its bake (server/evidence/report.ts).
const JOB_FROM = T0 - 15 * MIN
const JOB_TO = BAKE.to + 15 * MIN
const JOB_ROWS = (JOB_TO - JOB_FROM) / 1000
const EVIL_DEVICE = '=HYPERLINK("http://example.invalid","x")'
const EVIL_AT = T0 + 100 * MIN
const TDS_SHA = sha('invented data sheet of the test primer')
const OFFSET = 0.5

async function download(c: ApiClient, path: string) {
  const res = await fetch(app.url + path, { headers: { cookie: c.cookie } })
  return { status: res.status, headers: res.headers, body: Buffer.from(await res.arrayBuffer()) }
}

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  const db = app.db
  boothId = (await db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
  const painter = await db.selectFrom('users').select('id').where('email', '=', 'painter@larkspur.example').executeTakeFirstOrThrow()
  const tech = await db.selectFrom('users').select('id').where('email', '=', 'tech@larkspur.example').executeTakeFirstOrThrow()

  // Two invented solvent-borne products: Q10 2 at 20 °C.
  await db.insertInto('files').values({ sha256: TDS_SHA, size_bytes: 1234, content_type: 'application/pdf', original_name: 'test-primer-tds.pdf' }).execute()
  const pA = await db.insertInto('products').values({ name: 'Test primer (evidence)', category: 'primer_surfacer', chemistry: 'solvent', components: 2 }).returning('id').executeTakeFirstOrThrow()
  const pB = await db.insertInto('products').values({ name: 'Test clear (evidence)', category: 'clearcoat', chemistry: 'solvent', components: 2 }).returning('id').executeTakeFirstOrThrow()
  const rev = (product_id: number, extra: Record<string, unknown>) =>
    db
      .insertInto('spec_revisions')
      .values({ product_id, number: 1, ref_temp_c: 20, flash_min_minutes: 5, flash_max_minutes: 10, flash_before_next_minutes: 15, coats: 2, q10: 2, reducer_bands: '[]', bake_schedules: '[]', flash_table: null, ...extra })
      .returning('id')
      .executeTakeFirstOrThrow()
  const rA = await rev(pA.id, { tds_sha256: TDS_SHA })
  const rB = await rev(pB.id, { bake_schedules: JSON.stringify([{ objectTempC: 60, minutes: 30 }]), min_cure_temp_c: 20 })

  const job = await db
    .insertInto('jobs')
    .values({ number: 'RO-EV-1', vehicle: 'Invented test hatchback', colour_code: 'TST-1', panels: ['left front door'], painter_id: painter.id, booth_id: boothId, status: 'done' })
    .returning('id')
    .executeTakeFirstOrThrow()
  jobId = job.id
  const s1 = await db.insertInto('job_steps').values({ job_id: jobId, position: 1, revision_id: rA.id, coats_planned: 2 }).returning('id').executeTakeFirstOrThrow()
  const s2 = await db.insertInto('job_steps').values({ job_id: jobId, position: 2, revision_id: rB.id, coats_planned: 1 }).returning('id').executeTakeFirstOrThrow()
  const coat = (step_id: number, coat_number: number, startMin: number, endMin: number, overrides: unknown[] = []) =>
    db
      .insertInto('coats')
      .values({ job_id: jobId, step_id, booth_id: boothId, coat_number, painter_id: painter.id, started_at: new Date(T0 + startMin * MIN), finished_at: new Date(T0 + endMin * MIN), overrides: JSON.stringify(overrides), start_check: '{}' })
      .execute()
  await coat(s1.id, 1, 0, 5)
  await coat(s1.id, 2, 14, 20) // waited 9 min between coats
  await coat(s2.id, 1, 24, 30, [{ kind: 'flash_not_complete', detail: 'The primer had not finished its flash.', reason: 'customer waiting' }]) // waited 4 min before the next product

  const bake = await db
    .insertInto('bakes')
    .values({ booth_id: boothId, state: 'confirmed', source: 'manual', started_at: new Date(BAKE.from), ended_at: new Date(BAKE.to), end_source: 'manual', target_temp_c: 60, started_by: tech.id })
    .returning('id')
    .executeTakeFirstOrThrow()
  await db.insertInto('bake_jobs').values({ bake_id: bake.id, job_id: jobId, step_id: s2.id, revision_id: rB.id }).execute()
  await db
    .insertInto('alerts')
    .values({ booth_id: boothId, rule_id: 'test-rh', kind: 'threshold', severity: 'warning', message: 'Humidity above 62 % for 5 min (test)', opened_at: new Date(T0 + 2 * MIN), cleared_at: new Date(T0 + 12 * MIN), state: 'resolved', resolved_at: new Date(T0 + 12 * MIN), resolution: 'cleared' })
    .execute()
  await db
    .insertInto('calibrations')
    .values({ booth_id: boothId, channel: 'airTempC', effective_at: new Date(T0 - 86_400_000), reference_value: 17.5, sensor_value: 17, offset_value: OFFSET, instrument: 'reference thermometer (test)', next_due_at: new Date(T0 + 180 * 86_400_000), recorded_by: tech.id })
    .execute()

  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  await ensurePartitions(app.pool, READ_FROM, READ_TO)
  const rows = []
  for (let t = READ_FROM; t < READ_TO; t += 1000) {
    const baking = t >= BAKE.from && t < BAKE.to
    const air = baking ? 62 : 17
    rows.push({
      boothId, tsMs: t, receivedMs: t, deviceId: t === EVIL_AT ? EVIL_DEVICE : 'larkspur-downdraft-1', seq: (t - READ_FROM) / 1000,
      airTempC: air, rhPct: 64, panelTempC: baking ? 61 : null, airflowMps: 0.4, boothDpPa: -3.5, intakeFilterDpPa: 95, exhaustFilterDpPa: 140,
      heaterOn: baking, dewPointC: Math.round(dewPointC(air, 64) * 100) / 100,
    })
  }
  for (let i = 0; i < rows.length; i += 5000) await insertReadingBatch(app.pool, rows.slice(i, i + 5000))
  // Restart so the server's calibration cache holds the calibration from the start.
  await app.stop()
  await app.start()
  auditor = await app.as('auditor')
}, 180_000)
afterAll(async () => {
  await app?.close()
})

const exportedEvents = () => app.db.selectFrom('event_log').selectAll().where('type', '=', 'evidence.exported').orderBy('seq').execute()

describe('who may make evidence', () => {
  it('refuses painters and techs, and anyone signed out', async () => {
    const painter = await app.as('painter')
    const tech = await app.as('tech')
    for (const path of [`/api/evidence/pack?jobId=${jobId}`, `/api/evidence/environment-log?jobId=${jobId}`, `/api/evidence/summary?jobId=${jobId}`, '/api/exports']) {
      expect((await download(painter, path)).status, path).toBe(403)
      expect((await download(tech, path)).status, path).toBe(403)
      expect((await fetch(app.url + path)).status, path).toBe(401)
    }
  })

  it('has no route that changes data: nothing but GET is accepted, from the auditor or anyone', async () => {
    for (const path of ['/api/evidence/pack', '/api/evidence/environment-log', '/api/evidence/summary', '/api/exports', '/api/exports/00000000-0000-4000-8000-000000000000']) {
      for (const method of ['POST', 'PUT', 'PATCH', 'DELETE']) {
        const r = await auditor.request(method, `${path}?jobId=${jobId}`, {})
        expect(r.status, `${method} ${path}`).toBeGreaterThanOrEqual(400)
      }
    }
    expect((await app.db.selectFrom('exports').select('id').execute()).length).toBe(0)
  })

  it('answers a bad request plainly', async () => {
    const none = await auditor.get('/api/evidence/pack')
    expect(none.status).toBe(400)
    expect(none.body).toMatchObject({ issues: [expect.objectContaining({ path: 'jobId' })] })
    expect((await auditor.get(`/api/evidence/pack?boothId=${boothId}&from=2026-11-02T00:00:00Z&to=2026-11-01T00:00:00Z`)).status).toBe(400)
    expect((await auditor.get('/api/evidence/pack?jobId=999999')).status).toBe(404)
    expect((await auditor.get(`/api/evidence/pack?boothId=${boothId}&from=2020-01-01T00:00:00Z&to=2020-12-31T00:00:00Z`)).status).toBe(400)
  })
})

describe('the evidence pack of a job', () => {
  let zip: JSZip
  let headers: Headers
  let before: number
  let raw: Buffer
  beforeAll(async () => {
    before = (await exportedEvents()).length
    const r = await download(auditor, `/api/evidence/pack?jobId=${jobId}`)
    expect(r.status).toBe(200)
    headers = r.headers
    raw = r.body
    zip = await JSZip.loadAsync(r.body)
  }, 120_000)

  it('is a zip of the report, the environment log and the manifest, the manifest last', async () => {
    expect(headers.get('content-type')).toBe('application/zip')
    expect(headers.get('content-disposition')).toBe('attachment; filename="evidence-RO-EV-1.zip"')
    expect(Object.keys(zip.files)).toEqual(['report.pdf', 'environment-log.csv', 'manifest.json'])
    expect(raw.subarray(0, 4)).toEqual(Buffer.from([0x50, 0x4b, 0x03, 0x04]))
  })

  it('has a manifest whose hashes match the files in the zip', async () => {
    const manifest = JSON.parse(await zip.file('manifest.json')!.async('string'))
    expect(manifest.exportId).toBe(headers.get('x-export-id'))
    for (const f of manifest.files as { name: string; sha256: string; bytes: number }[]) {
      const bytes = await zip.file(f.name)!.async('uint8array')
      expect(sha(bytes), f.name).toBe(f.sha256)
      expect(bytes.length, f.name).toBe(f.bytes)
    }
    expect(manifest.scope).toMatchObject({ kind: 'job', jobId, jobNumber: 'RO-EV-1' })
    expect(manifest.generatedBy).toMatchObject({ name: 'Odette Brackwater', role: 'auditor' })
    expect(manifest.period).toEqual({ from: new Date(JOB_FROM).toISOString(), to: new Date(JOB_TO).toISOString() })
    expect(manifest.counts).toMatchObject({ readings: JOB_ROWS, coats: 3, bakes: 1, alerts: 1, specRevisions: 2 })
    expect(manifest.coatVerdicts).toEqual({ followed: 1, too_early: 1, last_coat: 1 })
    expect(manifest.eventLog.verified).toBe(true)
    // The head when the pack was made: the entry just before its own evidence.exported event.
    const own = (await exportedEvents()).at(-1)!
    const head = await app.db.selectFrom('event_log').select(['seq', 'hash']).where('seq', '=', own.seq - 1).executeTakeFirstOrThrow()
    expect(manifest.eventLog.head).toEqual(head)
  })

  it('is recorded: an evidence.exported event with the manifest hash, and an exports row', async () => {
    const events = await exportedEvents()
    expect(events.length).toBe(before + 1)
    const e = events[events.length - 1]!
    const data = JSON.parse(e.payload)
    const manifestBytes = await zip.file('manifest.json')!.async('uint8array')
    expect(data.manifestSha256).toBe(sha(manifestBytes))
    expect(data).toMatchObject({ exportId: headers.get('x-export-id'), kind: 'pack', jobId, jobNumber: 'RO-EV-1' })
    expect(e.actor_label).toBe('Odette Brackwater (auditor)')
    expect(e.subject_type).toBe('job')
    const row = await app.db.selectFrom('exports').selectAll().where('id', '=', headers.get('x-export-id')!).executeTakeFirstOrThrow()
    expect(row.manifest_sha256).toBe(data.manifestSha256)
    expect(row.manifest).toBe(Buffer.from(manifestBytes).toString('utf8'))
    expect(row.event_seq).toBe(e.seq)
    const list = await auditor.get<{ exports: { id: string; manifestSha256: string; exportedBy: string }[] }>('/api/exports')
    expect(list.body.exports[0]).toMatchObject({ id: row.id, manifestSha256: row.manifest_sha256, exportedBy: 'Odette Brackwater (auditor)' })
    const v = await auditor.get<{ intact: boolean }>('/api/event-log/verify')
    expect(v.body.intact).toBe(true)
  })

  it('holds a PDF report with the coat table, the flash verdicts and the other sections', async () => {
    const parser = new PDFParse({ data: await zip.file('report.pdf')!.async('uint8array') })
    const text = (await parser.getText()).text.replace(/\s+/g, ' ')
    await parser.destroy()
    expect(text).toContain('Repair order RO-EV-1 — Invented test hatchback')
    expect(text).toMatch(/Coat Product Booth Start \(UTC\)/)
    expect(text).toContain('1.1 Test primer (evidence) (rev. 1)')
    // Air 17 °C read, +0.5 °C calibration → 17.5 °C. Flash 5 min at 20 °C, Q10 2 (DESIGN.md §6):
    // 5 / 2^((17.5 − 20)/10) = 5.95 min between coats; 15 / 0.8409 = 17.8 min before the next product.
    expect(text).toContain('waited 9 min; 5.9 min needed at 17.5 °C / 64 % RH → followed the data sheet')
    expect(text).toContain('waited 4 min; 17.8 min needed at 17.5 °C / 64 % RH → recoated before the flash-off was complete; painter\'s reason: "customer waiting"')
    expect(text).toContain('last coat of the finish plan')
    expect(text).toContain('30 min at 60 °C')
    expect(text).toContain('Humidity above 62 % for 5 min (test)')
    expect(text).toContain(TDS_SHA.slice(0, 32))
    expect(text).toContain(TDS_SHA.slice(32))
    expect(text).toContain('reference thermometer (test)')
    expect(text).toMatch(/Page 1 of \d+/)
    expect(text).toContain('by Odette Brackwater (auditor)')
  })

  it('holds the environment log: RFC 4180, units in the header, every stored reading with its time and values', async () => {
    const bytes = Buffer.from(await zip.file('environment-log.csv')!.async('uint8array'))
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf])
    const text = bytes.toString('utf8')
    expect(text.endsWith('\r\n')).toBe(true)
    const outside = text.replace(/"[^"]*(""[^"]*)*"/g, '')
    expect(outside.split('\r\n').join('')).not.toMatch(/[\r\n]/)
    const records = parse(text, { bom: true, columns: true, record_delimiter: '\r\n' }) as Record<string, string>[]
    const stored = await app.db
      .selectFrom('readings')
      .select(['ts', 'air_temp_c', 'rh_pct', 'booth_dp_pa', 'device_id', 'heater_on'])
      .where('booth_id', '=', boothId)
      .where('ts', '>=', new Date(JOB_FROM))
      .where('ts', '<', new Date(JOB_TO))
      .orderBy('ts')
      .execute()
    expect(records.length).toBe(stored.length)
    expect(records.length).toBe(JOB_ROWS)
    for (let i = 0; i < stored.length; i += 97) {
      const r = records[i]!
      const s = stored[i]!
      expect(r['time_utc [ISO 8601]']).toBe(s.ts.toISOString())
      expect(Number(r['air_temp_c_raw [°C]'])).toBe(s.air_temp_c)
      expect(Number(r['air_temp_c [°C]'])).toBeCloseTo(s.air_temp_c! + OFFSET, 9)
      expect(Number(r['rh_pct [%]'])).toBe(s.rh_pct)
      expect(r['booth_dp_pa [Pa]']).toBe('-3.5')
      expect(r['heater_on [true/false]']).toBe(String(s.heater_on))
    }
    const evil = records.find((r) => r['time_utc [ISO 8601]'] === new Date(EVIL_AT).toISOString())!
    expect(evil.device_id).toBe(`'${EVIL_DEVICE}`)
    expect(text).toContain(`"'=HYPERLINK(""http://example.invalid"",""x"")"`)
  })
})

describe('the environment log alone and a booth period', () => {
  it('streams the CSV and records it with the hash of what was sent', async () => {
    const before = (await exportedEvents()).length
    const q = `boothId=${boothId}&from=${new Date(READ_FROM).toISOString()}&to=${new Date(READ_TO).toISOString()}`
    const r = await download(auditor, `/api/evidence/environment-log?${q}`)
    expect(r.status).toBe(200)
    expect(r.headers.get('content-type')).toMatch(/^text\/csv; charset=utf-8/)
    const events = await exportedEvents()
    expect(events.length).toBe(before + 1)
    const data = JSON.parse(events[events.length - 1]!.payload)
    expect(data).toMatchObject({ kind: 'csv', scope: 'booth', boothIds: [boothId], readings: (READ_TO - READ_FROM) / 1000, manifestSha256: null })
    expect(data.files[0]).toMatchObject({ sha256: sha(r.body), bytes: r.body.length })
  })

  it('makes a booth-period pack with the coats of the period', async () => {
    const q = `boothId=${boothId}&from=${new Date(READ_FROM).toISOString()}&to=${new Date(READ_TO).toISOString()}`
    const summary = await auditor.get<{ coats: { verdict: { code: string } }[]; coverage: { rows: number; gaps: unknown[] }; chain: { verified: boolean } }>(`/api/evidence/summary?${q}`)
    expect(summary.status).toBe(200)
    expect(summary.body.coats.map((c) => c.verdict.code)).toEqual(['followed', 'too_early', 'last_coat'])
    expect(summary.body.coverage).toMatchObject({ rows: (READ_TO - READ_FROM) / 1000, gaps: [] })
    const r = await download(await app.as('manager'), `/api/evidence/pack?${q}`)
    expect(r.status).toBe(200)
    const zip = await JSZip.loadAsync(r.body)
    const manifest = JSON.parse(await zip.file('manifest.json')!.async('string'))
    expect(manifest.scope).toEqual({ kind: 'booth', boothId })
    expect(manifest.files[1].rows).toBe((READ_TO - READ_FROM) / 1000)
  })
})
