import { z } from 'zod'

// The wire format (DESIGN.md §4): topics boothbeat/v1/{site}/{booth}/{reading|mode|status}, one JSON
// reading per message, SI units, device timestamp in ISO 8601 UTC.

export const TOPIC_ROOT = 'boothbeat/v1'
export const MAX_PAYLOAD_BYTES = 8 * 1024
export const MAX_FUTURE_MS = 5 * 60_000

export type TopicKind = 'reading' | 'mode' | 'status'

export interface ParsedTopic {
  site: string
  booth: string
  kind: TopicKind
}

const SLUG = /^[a-z0-9][a-z0-9-]{0,62}$/

export function boothTopic(site: string, booth: string, kind: TopicKind): string {
  return `${TOPIC_ROOT}/${site}/${booth}/${kind}`
}

export function parseTopic(topic: string): ParsedTopic | undefined {
  const parts = topic.split('/')
  if (parts.length !== 5 || `${parts[0]}/${parts[1]}` !== TOPIC_ROOT) return undefined
  const [, , site, booth, kind] = parts as [string, string, string, string, string]
  if (!SLUG.test(site) || !SLUG.test(booth)) return undefined
  if (kind !== 'reading' && kind !== 'mode' && kind !== 'status') return undefined
  return { site, booth, kind }
}

export const REJECT_REASONS = [
  'too_large',
  'bad_topic',
  'unknown_booth',
  'malformed_json',
  'wrong_types',
  'not_finite',
  'out_of_range',
  'ts_future',
  'ts_too_old',
] as const
export type RejectReason = (typeof REJECT_REASONS)[number]

const num = z.number({ error: 'must be a number' })

/** Types only; physical ranges are checked after, so the two kinds of fault are counted apart. */
const ReadingShape = z.object({
  ts: z.iso.datetime({ offset: true, error: 'ts must be an ISO 8601 timestamp' }),
  seq: z.number().int().nonnegative().optional(),
  airTempC: num.optional(),
  rhPct: num.optional(),
  panelTempC: num.optional(),
  airflowMps: num.optional(),
  boothDpPa: num.optional(),
  intakeFilterDpPa: num.optional(),
  exhaustFilterDpPa: num.optional(),
  heaterOn: z.boolean({ error: 'must be true or false' }).optional(),
})

export type WireReading = z.infer<typeof ReadingShape>

/** Physical ranges per channel (°C, %, m/s, Pa). Outside them a value is a fault, not weather. */
export const RANGES: Record<string, readonly [number, number]> = {
  airTempC: [-40, 150],
  panelTempC: [-40, 150],
  rhPct: [0, 100],
  airflowMps: [0, 50],
  boothDpPa: [-1000, 1000],
  intakeFilterDpPa: [0, 5000],
  exhaustFilterDpPa: [0, 5000],
}

export interface ValidReading extends WireReading {
  tsMs: number
}

export type ValidationResult = { ok: true; reading: ValidReading } | { ok: false; reason: RejectReason; detail: string }

const reject = (reason: RejectReason, detail: string): ValidationResult => ({ ok: false, reason, detail })

/** Validates one reading payload. `nowMs` and `maxAgeMs` bound the device timestamp. */
export function validateReading(payload: Buffer | string, nowMs: number, maxAgeMs: number): ValidationResult {
  const size = typeof payload === 'string' ? Buffer.byteLength(payload) : payload.length
  if (size > MAX_PAYLOAD_BYTES) return reject('too_large', `${size} bytes, limit ${MAX_PAYLOAD_BYTES}`)
  let json: unknown
  try {
    json = JSON.parse(typeof payload === 'string' ? payload : payload.toString('utf8'))
  } catch (e) {
    return reject('malformed_json', e instanceof Error ? e.message : 'not JSON')
  }
  if (json !== null && typeof json === 'object') {
    for (const [k, v] of Object.entries(json)) {
      if (typeof v === 'number' && !Number.isFinite(v)) return reject('not_finite', `${k} is not a finite number`)
    }
  }
  const parsed = ReadingShape.safeParse(json)
  if (!parsed.success) {
    const i = parsed.error.issues[0]!
    return reject('wrong_types', `${i.path.join('.') || 'payload'}: ${i.message}`)
  }
  const r = parsed.data
  for (const [k, [lo, hi]] of Object.entries(RANGES)) {
    const v = r[k as keyof WireReading]
    if (typeof v === 'number' && (v < lo || v > hi)) return reject('out_of_range', `${k}=${v} outside ${lo}…${hi}`)
  }
  const tsMs = Date.parse(r.ts)
  if (tsMs > nowMs + MAX_FUTURE_MS) return reject('ts_future', `ts ${r.ts} is more than 5 min ahead`)
  if (tsMs < nowMs - maxAgeMs) return reject('ts_too_old', `ts ${r.ts} is older than ${Math.round(maxAgeMs / 3_600_000)} h`)
  return { ok: true, reading: { ...r, tsMs } }
}

export const BOOTH_MODES = ['idle', 'spray', 'flash', 'bake', 'cool'] as const
export type BoothModeValue = (typeof BOOTH_MODES)[number]

const ModeShape = z.object({ ts: z.iso.datetime({ offset: true }).optional(), mode: z.enum(BOOTH_MODES) })

/** Mode messages: `{"ts","mode"}` or a bare mode word. */
export function parseMode(payload: Buffer, nowMs: number): { mode: BoothModeValue; tsMs: number } | undefined {
  const text = payload.toString('utf8').trim()
  if ((BOOTH_MODES as readonly string[]).includes(text)) return { mode: text as BoothModeValue, tsMs: nowMs }
  try {
    const r = ModeShape.safeParse(JSON.parse(text))
    if (!r.success) return undefined
    const tsMs = r.data.ts ? Date.parse(r.data.ts) : nowMs
    return { mode: r.data.mode, tsMs: tsMs > nowMs + MAX_FUTURE_MS ? nowMs : tsMs }
  } catch {
    return undefined
  }
}
