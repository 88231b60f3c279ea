import type { Kysely } from 'kysely'
import { dewPointC } from '#shared/cure/psychrometrics'
import { CALIBRATED_CHANNELS, CHANNEL_INFO, type CalibratedChannel } from '#shared/bake/channels'
import type { CalibrationInput } from '#shared/bake/schemas'
import { CHANNELS } from '../db/channels'
import type { Database } from '../db/database'
import type { ReadingRow } from '../telemetry/reading-row'
import type { SeriesChannel, SeriesPoint } from '../repositories/readings'
import { insertCalibration, listAllOffsets, listCalibrations } from '../repositories/calibrations'
import { findBooth } from '../repositories/booths'
import { actorOf, recorded } from './event-log'

// Sensor calibration offsets, applied when readings are READ (history, live screens, bakes, exports) — the
// stored raw readings are never rewritten, so a wrong calibration can be corrected by recording another.
// A calibration's offset (reference − sensor) applies to its channel from its effective time until the next
// calibration of the same channel replaces it (offsets do not add up: each compares the raw sensor value).
// The offsets live in an in-memory cache per booth and channel, loaded at start-up, reloaded after each change
// here and every 30 s (other instances' changes).

interface Track {
  at: number[]
  offset: number[]
}

let cache = new Map<number, Map<CalibratedChannel, Track>>()
let loading: Promise<void> | null = null
let loadedOnce = false

export async function reloadCalibrations(db: Kysely<Database>): Promise<void> {
  const rows = await listAllOffsets(db)
  const next = new Map<number, Map<CalibratedChannel, Track>>()
  for (const r of rows) {
    let booth = next.get(r.booth_id)
    if (!booth) next.set(r.booth_id, (booth = new Map()))
    let track = booth.get(r.channel)
    if (!track) booth.set(r.channel, (track = { at: [], offset: [] }))
    track.at.push(r.effective_at.getTime())
    track.offset.push(r.offset_value)
  }
  cache = next
  loadedOnce = true
}

/** Loads the cache once (later calls wait for the same load); readers that can await call this first. */
export function calibrationsReady(db: Kysely<Database>): Promise<void> {
  if (loadedOnce) return Promise.resolve()
  loading ??= reloadCalibrations(db).finally(() => {
    loading = null
  })
  return loading
}

/** For tests and start-up: replace the cache with the given offsets. */
export function setCalibrationCache(entries: readonly { boothId: number; channel: CalibratedChannel; effectiveMs: number; offset: number }[]): void {
  const next = new Map<number, Map<CalibratedChannel, Track>>()
  for (const e of [...entries].sort((a, b) => a.effectiveMs - b.effectiveMs)) {
    let booth = next.get(e.boothId)
    if (!booth) next.set(e.boothId, (booth = new Map()))
    let track = booth.get(e.channel)
    if (!track) booth.set(e.channel, (track = { at: [], offset: [] }))
    track.at.push(e.effectiveMs)
    track.offset.push(e.offset)
  }
  cache = next
  loadedOnce = true
}

/** The offset in force for a booth's channel at tsMs (0 when none). O(log n) per call; O(1) when uncalibrated. */
export function offsetAt(boothId: number, channel: CalibratedChannel, tsMs: number): number {
  const track = cache.get(boothId)?.get(channel)
  if (!track || !track.at.length) return 0
  const at = track.at
  if (tsMs < at[0]!) return 0
  // The newest calibration first (the usual case for live readings), then a binary search.
  const last = at.length - 1
  if (tsMs >= at[last]!) return track.offset[last]!
  let lo = 0
  let hi = last
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1
    if (at[mid]! <= tsMs) lo = mid
    else hi = mid - 1
  }
  return track.offset[lo]!
}

/**
 * A reading of `channel` taken at tsMs with the calibration in force then applied (null stays null).
 * The one function other readers (evidence exports, the booth screen) use.
 */
export function applyCalibration(boothId: number, channel: CalibratedChannel, tsMs: number, value: number | null): number | null {
  if (value === null || !Number.isFinite(value)) return value
  const o = offsetAt(boothId, channel, tsMs)
  return o === 0 ? value : value + o
}

export function hasCalibrations(boothId: number): boolean {
  return (cache.get(boothId)?.size ?? 0) > 0
}

const round2 = (v: number) => Math.round(v * 100) / 100

/** A whole ingest row calibrated; dew point recomputed when air temperature or humidity moved. */
export function calibrateReadingRow(row: ReadingRow): ReadingRow {
  if (!hasCalibrations(row.boothId)) return row
  const out: ReadingRow = { ...row }
  for (const c of CALIBRATED_CHANNELS) out[c] = applyCalibration(row.boothId, c, row.tsMs, row[c])
  if (out.airTempC !== row.airTempC || out.rhPct !== row.rhPct) {
    const rh = out.rhPct === null ? null : Math.min(100, out.rhPct)
    const dp = out.airTempC !== null && rh !== null && rh > 0 ? dewPointC(out.airTempC, rh) : Number.NaN
    out.dewPointC = Number.isFinite(dp) ? round2(dp) : null
  }
  return out
}

const COLUMN_OF: Record<CalibratedChannel, SeriesChannel> = Object.fromEntries(CHANNELS.map((c) => [c.wire, c.column])) as Record<CalibratedChannel, SeriesChannel>

/**
 * History points (raw rows or bucket means) calibrated at each point's time. A bucket that straddles a
 * calibration's effective time takes the offset in force at the bucket's start (an approximation within one bucket).
 */
export async function calibrateSeriesPoints(db: Kysely<Database>, boothId: number, points: SeriesPoint[]): Promise<SeriesPoint[]> {
  await calibrationsReady(db)
  if (!hasCalibrations(boothId)) return points
  return points.map((p) => {
    const t = p.t.getTime()
    const values = { ...p.values }
    let moved = false
    for (const c of CALIBRATED_CHANNELS) {
      const col = COLUMN_OF[c]
      const v = values[col]
      const cal = applyCalibration(boothId, c, t, v)
      if (cal !== v) {
        values[col] = cal
        if (c === 'airTempC' || c === 'rhPct') moved = true
      }
    }
    if (moved && values.air_temp_c !== null && values.rh_pct !== null) {
      const rh = Math.min(100, values.rh_pct)
      const dp = rh > 0 ? dewPointC(values.air_temp_c, rh) : Number.NaN
      values.dew_point_c = Number.isFinite(dp) ? round2(dp) : null
    }
    return { t: p.t, values }
  })
}

/** Largest believable offset per channel: beyond this the sensor needs repair, not an offset (our limits). */
export const MAX_OFFSET: Record<CalibratedChannel, number> = {
  airTempC: 15,
  panelTempC: 15,
  rhPct: 25,
  airflowMps: 2,
  boothDpPa: 50,
  intakeFilterDpPa: 200,
  exhaustFilterDpPa: 200,
}

export class CalibrationError extends Error {
  constructor(
    message: string,
    readonly statusCode = 400,
  ) {
    super(message)
  }
}

const FUTURE_SLACK_MS = 5 * 60_000

function calibrationView(r: Awaited<ReturnType<typeof listCalibrations>>[number]) {
  return {
    id: r.id,
    boothId: r.booth_id,
    channel: r.channel,
    channelLabel: CHANNEL_INFO[r.channel].label,
    unit: CHANNEL_INFO[r.channel].unit,
    effectiveAt: r.effective_at.toISOString(),
    referenceValue: r.reference_value,
    sensorValue: r.sensor_value,
    offset: r.offset_value,
    instrument: r.instrument,
    nextDueAt: r.next_due_at ? r.next_due_at.toISOString() : null,
    notes: r.notes,
    recordedBy: r.recorded_by_name ?? null,
    createdAt: r.created_at.toISOString(),
  }
}

/** Records a calibration (and its event), then reloads the offsets so the change shows at once. */
export async function recordCalibration(db: Kysely<Database>, user: { id: number; name: string; role: string }, input: CalibrationInput, nowMs = Date.now()) {
  const booth = await findBooth(db, input.boothId)
  if (!booth) throw new CalibrationError('No such booth', 404)
  const effective = input.effectiveAt ? Date.parse(input.effectiveAt) : nowMs
  if (effective > nowMs + FUTURE_SLACK_MS) throw new CalibrationError('The effective time cannot be in the future')
  const offset = input.referenceValue - input.sensorValue
  if (Math.abs(offset) > MAX_OFFSET[input.channel]) {
    throw new CalibrationError(
      `An offset of ${round2(offset)} ${CHANNEL_INFO[input.channel].unit} is more than a calibration should correct (${MAX_OFFSET[input.channel]}); repair or replace the sensor`,
    )
  }
  const nextDue = input.nextDueAt ? new Date(input.nextDueAt) : null
  if (nextDue && nextDue.getTime() <= effective) throw new CalibrationError('The next due date must be after the calibration')
  const row = await recorded(
    db,
    (tx) =>
      insertCalibration(tx, {
        booth_id: input.boothId,
        channel: input.channel,
        effective_at: new Date(effective),
        reference_value: input.referenceValue,
        sensor_value: input.sensorValue,
        offset_value: offset,
        instrument: input.instrument,
        next_due_at: nextDue,
        notes: input.notes ?? '',
        recorded_by: user.id,
      }),
    (r) => ({
      type: 'calibration.recorded',
      actor: actorOf(user),
      subject: { type: 'calibration', id: r.id },
      data: {
        boothId: r.booth_id,
        channel: r.channel,
        effectiveAt: r.effective_at.toISOString(),
        referenceValue: r.reference_value,
        sensorValue: r.sensor_value,
        offset: r.offset_value,
        instrument: r.instrument,
        nextDueAt: r.next_due_at ? r.next_due_at.toISOString() : null,
      },
    }),
  )
  await reloadCalibrations(db)
  return calibrationView({ ...row, recorded_by_name: user.name })
}

/** Calibrations of a booth (or all), newest first, with the offset in force now per channel. */
export async function calibrationsOf(db: Kysely<Database>, boothId: number | undefined, nowMs = Date.now()) {
  await calibrationsReady(db)
  const rows = await listCalibrations(db, boothId)
  const active =
    boothId === undefined
      ? null
      : Object.fromEntries(CALIBRATED_CHANNELS.map((c) => [c, offsetAt(boothId, c, nowMs)])) as Record<CalibratedChannel, number>
  return { calibrations: rows.map(calibrationView), activeOffsets: active }
}
