// Boothbeat wire format v1 as the simulator speaks it (DESIGN.md §4). Pure: no MQTT, no Node APIs.

export const MODES = ['idle', 'spray', 'flash', 'bake', 'cool'] as const
export type Mode = (typeof MODES)[number]

/** One sensor message. SI units; every channel optional except ts (ISO 8601 UTC from the device clock). */
export interface Reading {
  ts: string
  seq?: number
  airTempC?: number
  rhPct?: number
  panelTempC?: number
  airflowMps?: number
  boothDpPa?: number
  intakeFilterDpPa?: number
  exhaustFilterDpPa?: number
  heaterOn?: boolean
}

/** The optional measurement channels, in wire order. */
export const READING_CHANNELS = [
  'airTempC',
  'rhPct',
  'panelTempC',
  'airflowMps',
  'boothDpPa',
  'intakeFilterDpPa',
  'exhaustFilterDpPa',
  'heaterOn',
] as const
export type ReadingChannel = (typeof READING_CHANNELS)[number]
export type NumericChannel = Exclude<ReadingChannel, 'heaterOn'>

/** Payload of the retained `…/mode` topic. */
export interface ModeMessage {
  ts: string
  mode: Mode
}

/** Rules every clean (fault-free) message satisfies. */
export const WIRE_LIMITS = {
  tempMinC: -40,
  tempMaxC: 150,
  rhMinPct: 0,
  rhMaxPct: 100,
  airflowMinMps: 0,
  /** A device timestamp may be at most this far ahead of the receiver's clock. */
  maxAheadMs: 5 * 60_000,
  /** The server accepts device clock skew up to this; the simulator keeps well inside it. */
  maxSkewMs: 60_000,
  maxPayloadBytes: 8192,
} as const

export const STATUS_ONLINE = 'online'
export const STATUS_OFFLINE = 'offline'

export interface BoothTopics {
  reading: string
  mode: string
  status: string
}

/** Topic levels must be plain slugs: no wildcards, separators or spaces. */
export const SLUG_PATTERN = /^[a-z0-9][a-z0-9-]{0,62}$/

export function boothTopics(site: string, booth: string): BoothTopics {
  if (!SLUG_PATTERN.test(site)) throw new RangeError(`invalid site slug: ${JSON.stringify(site)}`)
  if (!SLUG_PATTERN.test(booth)) throw new RangeError(`invalid booth slug: ${JSON.stringify(booth)}`)
  const base = `boothbeat/v1/${site}/${booth}`
  return { reading: `${base}/reading`, mode: `${base}/mode`, status: `${base}/status` }
}

/** Device id (= MQTT username = client id) of a booth's sensor box. */
export function deviceIdFor(site: string, booth: string): string {
  return `${site}-${booth}`
}

export function isoTs(ms: number): string {
  return new Date(ms).toISOString()
}

export function modePayload(mode: Mode, tsMs: number): string {
  const message: ModeMessage = { ts: isoTs(tsMs), mode }
  return JSON.stringify(message)
}

/** Serialises a reading with keys in wire order (ts, seq, channels). */
export function readingPayload(reading: Reading): string {
  const ordered: Record<string, string | number | boolean> = { ts: reading.ts }
  if (reading.seq !== undefined) ordered.seq = reading.seq
  for (const channel of READING_CHANNELS) {
    const value = reading[channel]
    if (value !== undefined) ordered[channel] = value
  }
  return JSON.stringify(ordered)
}
