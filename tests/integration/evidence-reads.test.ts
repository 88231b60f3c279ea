import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { decodeReadings, minuteGaps, readingPage } from '../../server/repositories/exports'
import { insertReadingBatch } from '../../server/telemetry/insert-batch'
import { ensurePartitions } from '../../server/telemetry/partitions'
import type { ReadingRow } from '../../server/telemetry/reading-row'
import { startTestApp, type TestApp } from '../support/app'

// The two reads of the export that PostgreSQL does the work for: pages of readings as one text value each
// (server/repositories/exports.ts PAGE_SQL, decoded by decodeReadings), and the gaps of a period found from the
// per-minute rollups. Against the real server, on readings written by the ingest's own batch writer.
let app: TestApp
let boothId = 0
const M = 60_000
const T0 = Date.UTC(2026, 10, 30, 8, 0, 0) // 2026-11-30 08:00 UTC

const reading = (tsMs: number, over: Partial<ReadingRow> = {}): ReadingRow => ({
  boothId,
  tsMs,
  receivedMs: tsMs,
  deviceId: 'sensor-a',
  seq: Math.round((tsMs - T0) / 1000),
  airTempC: 21.4,
  rhPct: 50,
  panelTempC: null,
  airflowMps: 0.41,
  boothDpPa: -3.5,
  intakeFilterDpPa: 95,
  exhaustFilterDpPa: 140,
  heaterOn: false,
  dewPointC: 10.6,
  ...over,
})

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  boothId = (await app.db.selectFrom('booths').select('id').orderBy('id').executeTakeFirstOrThrow()).id
  await ensurePartitions(app.pool, T0 - 86_400_000, T0 + 86_400_000)
  // 08:00–08:10 every 10 s, nothing 08:10–08:17, 08:17–08:20 every 10 s, one odd device id at 08:20:00.5.
  const rows: ReadingRow[] = []
  for (let t = T0; t < T0 + 10 * M; t += 10_000) rows.push(reading(t))
  for (let t = T0 + 17 * M; t < T0 + 20 * M; t += 10_000) rows.push(reading(t))
  rows.push(reading(T0 + 20 * M + 500, { deviceId: 'odd\tid\\with\nbreaks', heaterOn: null, airTempC: null, seq: null }))
  await insertReadingBatch(app.pool, rows)
}, 120_000)

afterAll(async () => {
  await app?.close()
})

describe('pages of readings for the export', () => {
  it('reads every reading once, in time order, page by page on the timestamp cursor', async () => {
    const seen: string[] = []
    let after: string | null = null
    let pages = 0
    for (;;) {
      const page = await readingPage(app.pool, boothId, new Date(T0), new Date(T0 + 30 * M), after, 25)
      const readings = decodeReadings(page.encoded)
      pages++
      seen.push(...readings.map((r) => r[0]))
      if (readings.length < 25 || page.lastKey === null) break
      after = page.lastKey
    }
    expect(seen).toHaveLength(60 + 18 + 1)
    expect(pages).toBe(4)
    expect([...seen].sort()).toEqual(seen)
    expect(new Set(seen).size).toBe(seen.length)
    expect(seen[0]).toBe('2026-11-30T08:00:00.000Z')
    expect(seen.at(-1)).toBe('2026-11-30T08:20:00.500Z')
  })

  it('gives the stored values as text, a missing value as null, and the device id exactly as stored', async () => {
    const page = await readingPage(app.pool, boothId, new Date(T0), new Date(T0 + 1000), null, 10)
    expect(decodeReadings(page.encoded)).toEqual([['2026-11-30T08:00:00.000Z', 'sensor-a', '0', '21.4', '50', null, '0.41', '-3.5', '95', '140', 'false', '10.6']])
    const odd = await readingPage(app.pool, boothId, new Date(T0 + 20 * M), new Date(T0 + 21 * M), null, 10)
    const [r] = decodeReadings(odd.encoded)
    expect(r![1]).toBe('odd\tid\\with\nbreaks')
    expect([r![2], r![3], r![10]]).toEqual([null, null, null])
  })

  it('gives no readings and no cursor past the end', async () => {
    const page = await readingPage(app.pool, boothId, new Date(T0 + 60 * M), new Date(T0 + 90 * M), null, 10)
    expect(page).toEqual({ encoded: null, lastKey: null })
  })
})

describe('gaps of a period from the minute rollups', () => {
  const gaps = async (fromMin: number, toMin: number, min = 5) =>
    (await minuteGaps(app.db, [boothId], new Date(T0 + fromMin * M), new Date(T0 + toMin * M), min)).map((g) => [(g.from.getTime() - T0) / M, (g.to.getTime() - T0) / M])

  it('finds a run of missing minutes between readings, and one that runs to the end of the period', async () => {
    expect(await gaps(0, 21)).toEqual([[10, 17]])
    expect(await gaps(0, 30)).toEqual([[10, 17], [21, 30]])
  })

  it('finds a run at the start of the period, and ignores runs shorter than the threshold', async () => {
    expect(await gaps(-6, 21)).toEqual([[-6, 0], [10, 17]])
    expect(await gaps(-4, 21, 8)).toEqual([])
    expect(await gaps(0, 21, 7)).toEqual([[10, 17]])
    expect(await gaps(0, 21, 8)).toEqual([])
  })

  it('reports the whole period as one gap when it has no reading, and the same with no booth at all', async () => {
    expect(await gaps(60, 120)).toEqual([[60, 120]])
    expect(await minuteGaps(app.db, [], new Date(T0), new Date(T0 + 60 * M), 5)).toEqual([{ from: new Date(T0), to: new Date(T0 + 60 * M) }])
  })
})
