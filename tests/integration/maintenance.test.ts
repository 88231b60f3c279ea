import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../support/app'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'
import type { ReadingRow } from '../../server/telemetry/reading-row'

// Booth upkeep end to end: calibration offsets applied at read time only, reminders (date, hours, trend),
// counters, the booth's upkeep history, events and roles.
let app: TestApp
const booth: Record<string, number> = {}
const MIN = 60_000
const H = 3_600_000
const DAY = 86_400_000

function row(boothSlug: string, tsMs: number, o: Partial<ReadingRow> = {}): ReadingRow {
  return {
    boothId: booth[boothSlug]!,
    tsMs,
    receivedMs: tsMs,
    deviceId: `larkspur-${boothSlug}`,
    seq: null,
    airTempC: 20,
    rhPct: 50,
    panelTempC: 40,
    airflowMps: 0.45,
    boothDpPa: 6,
    intakeFilterDpPa: 80,
    exhaustFilterDpPa: 120,
    heaterOn: false,
    dewPointC: 9.26,
    ...o,
  }
}

async function insertRows(rows: ReadingRow[]) {
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  for (let i = 0; i < rows.length; i += 2000) await insertReadingBatch(app.pool, rows.slice(i, i + 2000))
}

beforeAll(async () => {
  app = await startTestApp()
  for (const b of await app.db.selectFrom('booths').select(['id', 'slug']).execute()) booth[b.slug] = b.id
})
afterAll(async () => {
  await app?.close()
})

type History = { resolution: string; t: string[]; series: Record<string, (number | null)[]> }

describe('sensor calibration', () => {
  it('shifts readings from its effective time only, is replaced (not added to) by a later one, and leaves raw rows alone', async () => {
    const now = Date.now()
    // Downdraft 1: panel 40.0 °C every 10 s from 120 to 60 min ago.
    const rows: ReadingRow[] = []
    for (let t = now - 120 * MIN; t < now - 60 * MIN; t += 10_000) rows.push(row('downdraft-1', t))
    await insertRows(rows)
    const tech = await app.as('tech')
    const first = await tech.post<{ id: number; offset: number }>('/api/calibrations', {
      boothId: booth['downdraft-1'],
      channel: 'panelTempC',
      effectiveAt: new Date(now - 100 * MIN).toISOString(),
      referenceValue: 41.2,
      sensorValue: 40,
      instrument: 'Contact thermometer, invented serial TC-0042',
      nextDueAt: new Date(now + 180 * DAY).toISOString(),
    })
    expect(first.status).toBe(201)
    expect(first.body.offset).toBeCloseTo(1.2, 9)
    const second = await tech.post('/api/calibrations', {
      boothId: booth['downdraft-1'],
      channel: 'panelTempC',
      effectiveAt: new Date(now - 80 * MIN).toISOString(),
      referenceValue: 39.5,
      sensorValue: 40,
    })
    expect(second.status).toBe(201)

    // 40 minutes of raw rows (one a second at most → raw resolution).
    const from = new Date(now - 110 * MIN).toISOString()
    const to = new Date(now - 70 * MIN).toISOString()
    const h = await tech.get<History>(`/api/booths/${booth['downdraft-1']}/readings?from=${from}&to=${to}`)
    expect(h.status).toBe(200)
    expect(h.body.resolution).toBe('raw')
    const at = (iso: string) => Date.parse(iso)
    h.body.t.forEach((t, i) => {
      const v = h.body.series.panelTempC![i]!
      if (at(t) < now - 100 * MIN) expect(v).toBeCloseTo(40, 5) // before the first calibration: unchanged
      else if (at(t) < now - 80 * MIN) expect(v).toBeCloseTo(41.2, 5) // + 1.2
      else expect(v).toBeCloseTo(39.5, 5) // − 0.5 (replaces + 1.2)
    })
    expect(h.body.t.some((t) => at(t) < now - 100 * MIN)).toBe(true)
    expect(h.body.t.some((t) => at(t) >= now - 80 * MIN)).toBe(true)
    // Air temperature was not calibrated.
    expect(new Set(h.body.series.airTempC)).toEqual(new Set([20]))

    // The stored rows are the raw values still.
    const stored = await app.db.selectFrom('readings').select('panel_temp_c').where('booth_id', '=', booth['downdraft-1']!).distinct().execute()
    expect(stored.map((r) => r.panel_temp_c)).toEqual([40])

    // Live: a reading arriving now shows on the booth list with the offset in force (−0.5).
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    await c.publishAsync(topicOf('downdraft-1'), reading(Date.now() - 500, { panelTempC: 40 }), { qos: 1 })
    await c.endAsync()
    const live = await waitUntil(async () => {
      const r = await tech.get<{ booths: { id: number; latest: { panelTempC: number } | null }[] }>('/api/booths')
      const b = r.body.booths.find((x) => x.id === booth['downdraft-1'])
      return b?.latest ? b.latest : undefined
    })
    expect(live.panelTempC).toBeCloseTo(39.5, 5)

    const list = await tech.get<{ calibrations: { offset: number }[]; activeOffsets: Record<string, number> }>(`/api/calibrations?boothId=${booth['downdraft-1']}`)
    expect(list.body.calibrations.map((x) => Math.round(x.offset * 10) / 10)).toEqual([-0.5, 1.2])
    expect(list.body.activeOffsets.panelTempC).toBeCloseTo(-0.5, 9)
    const events = await app.db.selectFrom('event_log').select(['type', 'actor_label']).where('type', '=', 'calibration.recorded').execute()
    expect(events).toHaveLength(2)
  })

  it('refuses an implausible offset, a future time, and painters and auditors', async () => {
    const tech = await app.as('tech')
    const base = { boothId: booth['downdraft-2'], channel: 'airTempC', referenceValue: 20, sensorValue: 20.3 }
    expect((await tech.post('/api/calibrations', { ...base, sensorValue: 45 })).status).toBe(400)
    expect((await tech.post('/api/calibrations', { ...base, effectiveAt: new Date(Date.now() + DAY).toISOString() })).status).toBe(400)
    expect((await tech.post('/api/calibrations', { ...base, channel: 'heaterOn' })).status).toBe(400)
    for (const who of ['painter', 'auditor']) {
      const c = await app.as(who)
      expect((await c.post('/api/calibrations', base)).status).toBe(403)
      expect((await c.get(`/api/calibrations?boothId=${booth['downdraft-2']}`)).status).toBe(200)
    }
    expect(await app.db.selectFrom('calibrations').select('id').where('booth_id', '=', booth['downdraft-2']!).execute()).toEqual([])
  })
})

type Reminder = { task: string; status: string; boothId: number; label: string; reasons: { by: string; status: string; message: string }[] }

describe('maintenance reminders', () => {
  it('by the filter pressure-drop trend, by booth hours, by date; a filter change resets its reminder', async () => {
    const now = Date.now()
    const id = booth['downdraft-2']!
    // Three days of readings every 10 min: exhaust drop rising 25 Pa a day to 225 Pa now (250 Pa limit in about
    // a day, well inside the 7-day horizon); intake flat at 80 Pa.
    const rows: ReadingRow[] = []
    for (let t = now - 3 * DAY; t < now - MIN; t += 10 * MIN) rows.push(row('downdraft-2', t, { exhaustFilterDpPa: 225 - (25 * (now - t)) / DAY }))
    await insertRows(rows)
    // Controller modes: spray from 12 h ago, idle for the last hour → 11 booth hours.
    await app.db
      .insertInto('booth_modes')
      .values([
        { booth_id: id, ts: new Date(now - 12 * H), mode: 'spray' },
        { booth_id: id, ts: new Date(now - H), mode: 'idle' },
      ])
      .execute()

    const manager = await app.as('manager')
    const tech = await app.as('tech')
    expect((await tech.request('PUT', '/api/maintenance/rules', { boothId: id, task: 'intake_filter', intervalBoothHours: 10 })).status).toBe(403)
    const put = await manager.request('PUT', '/api/maintenance/rules', { boothId: id, task: 'intake_filter', intervalBoothHours: 10 })
    expect(put.status).toBe(200)
    expect(put.body).toMatchObject({ rule: { task: 'intake_filter', intervalBoothHours: 10, intervalDays: 180 } })

    // An inspection 40 days ago: due by date (every 30 days).
    const insp = await tech.post('/api/maintenance/inspections', {
      boothId: id,
      inspectedAt: new Date(now - 40 * DAY).toISOString(),
      items: ['lights', 'door_seals', 'manometer', 'fire_suppression_tag', 'interlocks', 'drains'].map((key) => ({ key, ok: key !== 'drains', ...(key === 'drains' ? { note: 'Grate 2 slow' } : {}) })),
    })
    expect(insp.status).toBe(201)
    expect((await tech.post('/api/maintenance/inspections', { boothId: id, items: [{ key: 'lights', ok: true }] })).status).toBe(400)

    const auditor = await app.as('auditor')
    const r1 = await auditor.get<{ reminders: Reminder[]; due: number }>(`/api/maintenance/reminders?boothId=${id}`)
    expect(r1.status).toBe(200)
    const byTask = (rs: Reminder[], task: string) => rs.find((r) => r.task === task)!
    const exhaust = byTask(r1.body.reminders, 'exhaust_filter')
    const trend = exhaust.reasons.find((x) => x.by === 'trend')!
    expect(trend.status).toBe('due')
    expect(trend.message).toMatch(/^At the recent rate \(\+2\d(\.\d)? Pa a day\) it reaches 250 Pa in about [01](\.\d)? days$/)
    expect(exhaust.status).toBe('due')
    const intake = byTask(r1.body.reminders, 'intake_filter')
    expect(intake.reasons.find((x) => x.by === 'trend')).toMatchObject({ status: 'ok', message: 'Pressure drop is not rising' })
    expect(intake.reasons.find((x) => x.by === 'hours')).toMatchObject({ status: 'due', message: '11 of 10 booth hours used' })
    expect(byTask(r1.body.reminders, 'inspection').reasons[0]).toMatchObject({ by: 'date', status: 'due' })
    expect(r1.body.due).toBeGreaterThanOrEqual(3)

    // The exhaust filter is changed now: no points since, the date and hours start again → ok.
    const fc = await tech.post('/api/maintenance/filter-changes', { boothId: id, filter: 'exhaust', dpBeforePa: 226, dpAfterPa: 95, notes: 'Paint-arrestor pads replaced' })
    expect(fc.status).toBe(201)
    const r2 = await tech.get<{ reminders: Reminder[] }>(`/api/maintenance/reminders?boothId=${id}`)
    const after = byTask(r2.body.reminders, 'exhaust_filter')
    expect(after.status).toBe('ok')
    expect(after.reasons.some((x) => x.by === 'trend')).toBe(false)

    // A heater service by note; a calibration whose next due date has passed → a calibration reminder.
    expect((await tech.post('/api/maintenance/notes', { boothId: id, kind: 'heater_service', text: 'Burner cleaned, flame sensor checked' })).status).toBe(201)
    expect((await tech.post('/api/maintenance/notes', { boothId: id, text: 'Left door closer squeaks' })).status).toBe(201)
    expect(
      (
        await tech.post('/api/calibrations', {
          boothId: id,
          channel: 'rhPct',
          effectiveAt: new Date(now - 200 * DAY).toISOString(),
          referenceValue: 51,
          sensorValue: 50,
          nextDueAt: new Date(now - DAY).toISOString(),
        })
      ).status,
    ).toBe(201)
    const r3 = await tech.get<{ reminders: Reminder[] }>(`/api/maintenance/reminders?boothId=${id}`)
    expect(byTask(r3.body.reminders, 'heater_service').status).toBe('ok')
    expect(byTask(r3.body.reminders, 'calibration')).toMatchObject({ status: 'due', label: 'Sensor calibration — Relative humidity' })
    // The prep deck has no heater: no heater service reminder; all booths without a boothId.
    const all = await tech.get<{ reminders: Reminder[] }>('/api/maintenance/reminders')
    expect(all.body.reminders.some((r) => r.boothId === booth['prep-deck'] && r.task === 'heater_service')).toBe(false)
    expect(new Set(all.body.reminders.map((r) => r.boothId))).toEqual(new Set(Object.values(booth)))

    const types = (await app.db.selectFrom('event_log').select('type').where('type', 'like', 'maintenance.%').execute()).map((e) => e.type)
    expect(types.sort()).toEqual(['maintenance.filter_changed', 'maintenance.heater_serviced', 'maintenance.inspected', 'maintenance.noted', 'maintenance.rule_set'])
  })

  it('counters: hours per controller mode and bake cycles, over all time or a range', async () => {
    const id = booth['downdraft-2']!
    const tech = await app.as('tech')
    const all = await tech.get<{ hoursByMode: Record<string, number>; boothHours: number; bakeCycles: number }>(`/api/booths/${id}/counters`)
    expect(all.status).toBe(200)
    expect(all.body.hoursByMode.spray).toBeCloseTo(11, 1)
    expect(all.body.hoursByMode.idle).toBeCloseTo(1, 1)
    expect(all.body.boothHours).toBeCloseTo(11, 1)
    expect(all.body.bakeCycles).toBe(0)
    const from = new Date(Date.now() - 6 * H).toISOString()
    const part = await tech.get<{ hoursByMode: Record<string, number> }>(`/api/booths/${id}/counters?from=${from}`)
    expect(part.body.hoursByMode.spray).toBeCloseTo(5, 1)
    expect((await tech.get(`/api/booths/${id}/counters?from=yesterday`)).status).toBe(400)
    expect((await tech.get('/api/booths/999/counters')).status).toBe(404)
  })

  it('the booth history lists every upkeep record, newest first', async () => {
    const painter = await app.as('painter')
    const h = await painter.get<{ items: { kind: string; at: string; title: string; detail: string; ok: boolean | null }[] }>(`/api/booths/${booth['downdraft-2']}/history`)
    expect(h.status).toBe(200)
    const kinds = h.body.items.map((i) => i.kind)
    expect(new Set(kinds)).toEqual(new Set(['filter_change', 'calibration', 'inspection', 'note', 'heater_service']))
    const times = h.body.items.map((i) => Date.parse(i.at))
    expect([...times].sort((a, b) => b - a)).toEqual(times)
    const insp = h.body.items.find((i) => i.kind === 'inspection')!
    expect(insp).toMatchObject({ ok: false, detail: 'Needs attention: Drains' })
    expect(h.body.items.find((i) => i.kind === 'filter_change')!.detail).toBe('Pressure drop 226 → 95 Pa · Paint-arrestor pads replaced')
  })

  it('painter and auditor may not record upkeep', async () => {
    for (const who of ['painter', 'auditor']) {
      const c = await app.as(who)
      expect((await c.post('/api/maintenance/filter-changes', { boothId: booth['prep-deck'], filter: 'intake' })).status).toBe(403)
      expect((await c.post('/api/maintenance/notes', { boothId: booth['prep-deck'], text: 'x' })).status).toBe(403)
      expect((await c.post('/api/maintenance/inspections', { boothId: booth['prep-deck'], items: [] })).status).toBe(403)
      expect((await c.request('PUT', '/api/maintenance/rules', { boothId: booth['prep-deck'], task: 'inspection', intervalDays: 7 })).status).toBe(403)
    }
    expect(await app.db.selectFrom('filter_changes').select('id').where('booth_id', '=', booth['prep-deck']!).execute()).toEqual([])
  })
})
