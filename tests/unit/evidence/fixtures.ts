import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import type { PdfFonts } from '../../../server/evidence/pdf'
import type { ConditionStats, EvidenceReport } from '../../../server/evidence/types'

// An invented report (DESIGN.md §10) for the renderer tests.

export const fonts: PdfFonts = {
  regular: readFileSync(fileURLToPath(new URL('../../../server/evidence/fonts/LiberationSans-Regular.ttf', import.meta.url))),
  bold: readFileSync(fileURLToPath(new URL('../../../server/evidence/fonts/LiberationSans-Bold.ttf', import.meta.url))),
}

const stats = (t: number, rh: number, n = 600): ConditionStats => ({
  n,
  airTempC: { min: t - 0.4, max: t + 0.4, mean: t },
  rhPct: { min: rh - 2, max: rh + 2, mean: rh },
  panelTempC: null,
  dewPointMarginC: { min: 6.1, max: 7.0, mean: 6.5 },
  airflowMps: { min: 0.38, max: 0.44, mean: 0.41 },
})

const T0 = Date.UTC(2026, 10, 30, 8, 0, 0)
const at = (min: number) => new Date(T0 + min * 60_000).toISOString()

export function sampleReport(over: Partial<EvidenceReport> = {}): EvidenceReport {
  const series = Array.from({ length: 120 }, (_, i): [number, number | null] => [T0 + i * 60_000, 17 + Math.sin(i / 10)])
  return {
    exportId: '00000000-0000-4000-8000-000000000001',
    title: 'Repair order RO-4711 — 2019 hatchback, grey',
    scope: { kind: 'job', jobId: 1, jobNumber: 'RO-4711' },
    booths: [{ id: 1, slug: 'downdraft-1', name: 'Downdraft booth 1' }],
    period: { from: at(-15), to: at(120) },
    generatedAt: '2026-12-01T09:00:00.000Z',
    generatedBy: { id: 5, name: 'Odette Brackwater', role: 'auditor' },
    units: 'SI: °C, % relative humidity, m/s, Pa; times UTC',
    jobs: [
      { id: 1, number: 'RO-4711', vehicle: '2019 hatchback, grey', colourCode: 'GR-118', panels: ['front left door'], notes: '', status: 'done', painter: 'Jun Halloway', booth: 'Downdraft booth 1', createdAt: at(-600) },
    ],
    plan: [
      { jobNumber: 'RO-4711', position: 1, product: 'Waterborne basecoat, silver metallic', revisionNumber: 1, coatsPlanned: 2, coatsDone: 2, note: '' },
      { jobNumber: 'RO-4711', position: 2, product: '2K high-solids clearcoat', revisionNumber: 2, coatsPlanned: 1, coatsDone: 1, note: '' },
    ],
    coats: [
      {
        id: 11, jobId: 1, jobNumber: 'RO-4711', boothId: 1, boothName: 'Downdraft booth 1', stepPosition: 1, product: 'Waterborne basecoat, silver metallic (rev. 1)', revisionId: 3,
        coatNumber: 1, painter: 'Jun Halloway', startedAt: at(0), finishedAt: at(6), sprayMinutes: 6, during: stats(17.2, 63),
        flash: { kind: 'between_coats', nextCoatId: 12, from: at(6), to: at(15), stats: stats(17, 64), specMinMinutes: 5, specMaxMinutes: 10, refTempC: 20, requiredMinutes: 7.5, waitedMinutes: 9, progress: 1.2, recoatWindowMinutes: null, uncertain: false, reasons: [], recordedProgress: 1.18 },
        overrides: [], verdict: { code: 'followed', reason: 'waited 9 min; 7.5 min needed at 17 °C / 64 % RH → followed the data sheet' },
      },
      {
        id: 12, jobId: 1, jobNumber: 'RO-4711', boothId: 1, boothName: 'Downdraft booth 1', stepPosition: 1, product: 'Waterborne basecoat, silver metallic (rev. 1)', revisionId: 3,
        coatNumber: 2, painter: 'Jun Halloway', startedAt: at(15), finishedAt: at(21), sprayMinutes: 6, during: stats(17.4, 62),
        flash: { kind: 'next_product', nextCoatId: 13, from: at(21), to: at(25), stats: stats(17.1, 65), specMinMinutes: 15, specMaxMinutes: 15, refTempC: 20, requiredMinutes: 19.5, waitedMinutes: 4, progress: 0.2, recoatWindowMinutes: null, uncertain: false, reasons: [], recordedProgress: null },
        overrides: [], verdict: { code: 'too_early', reason: 'waited 4 min; 19.5 min needed at 17.1 °C / 65 % RH → recoated before the flash-off was complete; painter\'s reason: "customer waiting"' },
      },
      {
        id: 13, jobId: 1, jobNumber: 'RO-4711', boothId: 1, boothName: 'Downdraft booth 1', stepPosition: 2, product: '2K high-solids clearcoat (rev. 2)', revisionId: 4,
        coatNumber: 1, painter: 'Jun Halloway', startedAt: at(25), finishedAt: at(32), sprayMinutes: 7, during: stats(17.5, 61), flash: null,
        overrides: [{ kind: 'flash_not_complete', detail: 'The previous coat has not finished the flash.', reason: 'customer waiting' }],
        verdict: { code: 'last_coat', reason: 'last coat of the finish plan: the bake or air-dry follows (see Bake)' },
      },
    ],
    bakes: [
      {
        id: 7, boothName: 'Downdraft booth 1', state: 'signed_off', startedAt: at(40), endedAt: at(90), targetC: 60, peakC: 61.2, holdMinutes: 32, verdict: 'pass', frozen: true,
        schedules: [{ label: '2K high-solids clearcoat (rev. 2) — 30 min at 60 °C', requiredMinutes: 30, specTempC: 60, equivalentMinutes: 33.4, heldMinutes: 31, verdict: 'pass', reason: 'held 31 min at ≥ 60 °C; needs 30 min equivalent; cure credit 33.4 min → pass' }],
        jobs: ['RO-4711'], signedOffBy: 'Tomas Reedley', signedOffAt: at(95), signOffNotes: 'panel checked', notes: '',
      },
    ],
    alerts: [
      { id: 3, boothName: 'Downdraft booth 1', severity: 'warning', kind: 'threshold', message: 'Humidity above 70 % for 5 min', openedAt: at(50), clearedAt: at(58), state: 'resolved', acknowledged: 'acknowledged by Priya Fenwick at 2026-11-30 08:52', resolved: 'resolved when the condition cleared' },
    ],
    revisions: [
      { id: 3, product: 'Waterborne basecoat, silver metallic', number: 1, frozenAt: at(0), tdsSha256: 'a'.repeat(64), tdsFileName: 'basecoat-tds.pdf', flash: '5–10 min between coats, 15 min before the next product, at 20 °C' },
    ],
    calibrations: [
      { boothName: 'Downdraft booth 1', channel: 'airTempC', label: 'Air temperature', state: 'in date', effectiveAt: at(-10000), offset: 0.3, unit: '°C', instrument: 'reference thermometer', nextDueAt: '2027-05-01T00:00:00.000Z' },
      { boothName: 'Downdraft booth 1', channel: 'rhPct', label: 'Relative humidity', state: 'never calibrated', effectiveAt: null, offset: null, unit: '%', instrument: null, nextDueAt: null },
    ],
    signOffs: [{ what: 'Bake 7 (Downdraft booth 1) signed off', by: 'Tomas Reedley', at: at(95), notes: 'panel checked' }],
    chain: { head: { seq: 42, hash: 'b'.repeat(64) }, verified: true, count: 42, brokenAt: null, reason: null },
    coverage: { rows: 8100, expectedRows: 8100, ratio: 1, gaps: [], minGapMinutes: 5 },
    charts: [
      {
        title: 'Temperature, dew point and humidity — Downdraft booth 1',
        axes: ['°C', '%'],
        series: [
          { name: 'Air', unit: '°C', axis: 0, points: series },
          { name: 'RH', unit: '%', axis: 1, points: series.map(([t, v]) => [t, v === null ? null : v * 3.7]) },
        ],
        marks: [{ label: '1.1', from: T0, to: T0 + 15 * 60_000 }],
      },
    ],
    notes: [],
    ...over,
  }
}
