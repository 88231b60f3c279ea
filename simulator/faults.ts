// Deliberately broken messages, for exercising the server's validation and quarantine path.
// Every fault produced here violates at least one wire rule (see WIRE_LIMITS): the unit tests check that.

import type { Random } from './prng'
import { isoTs, readingPayload, READING_CHANNELS, WIRE_LIMITS, type NumericChannel, type Reading } from './wire'

export const FAULT_KINDS = [
  'malformed-json',
  'wrong-type',
  'nan-like',
  'out-of-range',
  'future-ts',
  'oversize',
] as const
export type FaultKind = (typeof FAULT_KINDS)[number]

export interface FaultyMessage {
  kind: FaultKind
  payload: string
}

function numericChannels(reading: Reading): NumericChannel[] {
  const out: NumericChannel[] = []
  for (const c of READING_CHANNELS) if (c !== 'heaterOn' && reading[c] !== undefined) out.push(c)
  return out
}

/** Replaces `"key":<value>` in a serialised reading by `"key":<raw>` (raw is inserted verbatim). */
function replaceValue(payload: string, key: string, raw: string): string {
  const obj = JSON.parse(payload) as Record<string, unknown>
  const marker = '\u0001FAULT\u0001'
  obj[key] = marker
  return JSON.stringify(obj).replace(JSON.stringify(marker), raw)
}

function malformed(reading: Reading, rng: Random): string {
  const text = readingPayload(reading)
  switch (rng.int(0, 3)) {
    case 0:
      // Truncated mid-message: the closing brace (at least) is missing.
      return text.slice(0, rng.int(1, text.length - 1))
    case 1:
      // Trailing comma.
      return `${text.slice(0, -1)},}`
    case 2:
      // Single-quoted keys and strings.
      return text.replaceAll('"', "'")
    default:
      // Not JSON at all: the key=value form of an old controller.
      return Object.entries(reading)
        .map(([k, v]) => `${k}=${String(v)}`)
        .join(';')
  }
}

function wrongType(reading: Reading, rng: Random): string {
  const text = readingPayload(reading)
  const channels = numericChannels(reading)
  const options: (() => string)[] = [
    // Number sent as a string.
    () => {
      const c = channels.length > 0 ? channels[rng.int(0, channels.length - 1)] : undefined
      return c === undefined ? replaceValue(text, 'seq', '"1"') : replaceValue(text, c, JSON.stringify(String(reading[c])))
    },
    // Sequence number as a string.
    () => replaceValue(text, 'seq', JSON.stringify(String(reading.seq ?? 0))),
    // Timestamp as epoch milliseconds instead of ISO 8601.
    () => replaceValue(text, 'ts', String(Date.parse(reading.ts))),
    // Boolean channel as a word, or a number channel as an object.
    () =>
      reading.heaterOn !== undefined
        ? replaceValue(text, 'heaterOn', rng.chance(0.5) ? '"on"' : '1')
        : replaceValue(text, 'airTempC', '{"value":21.4}'),
  ]
  const make = options[rng.int(0, options.length - 1)]
  return make ? make() : replaceValue(text, 'seq', '"1"')
}

function nanLike(reading: Reading, rng: Random): string {
  const text = readingPayload(reading)
  const channels = numericChannels(reading)
  const channel = channels.length > 0 ? (channels[rng.int(0, channels.length - 1)] ?? 'airTempC') : 'airTempC'
  // NaN and Infinity literals are not JSON; null is what JSON.stringify makes of NaN; 1e999 parses to Infinity.
  const raw = rng.pick(['NaN', 'null', '"NaN"', '1e999', '-Infinity', '"Infinity"'] as const)
  return replaceValue(text, channel, raw)
}

function outOfRange(reading: Reading, rng: Random): string {
  const bad: Reading = { ...reading }
  switch (rng.int(0, 4)) {
    case 0:
      bad.rhPct = rng.pick([140, 101.5, -5] as const)
      break
    case 1:
      bad.airTempC = rng.pick([400, 151, -80] as const)
      break
    case 2:
      bad.panelTempC = rng.pick([400, -60] as const)
      break
    case 3:
      bad.airflowMps = rng.pick([-0.5, -0.01] as const)
      break
    default:
      bad.rhPct = 140
      bad.airTempC = 400
  }
  return readingPayload(bad)
}

function futureTs(reading: Reading, rng: Random): string {
  const aheadMs = WIRE_LIMITS.maxAheadMs + Math.round(rng.uniform(3_600_000, 30 * 86_400_000))
  return readingPayload({ ...reading, ts: isoTs(Date.parse(reading.ts) + aheadMs) })
}

function oversize(reading: Reading, rng: Random): string {
  const text = readingPayload(reading)
  const length = WIRE_LIMITS.maxPayloadBytes + rng.int(64, 4096)
  const alphabet = 'abcdefghijklmnopqrstuvwxyz0123456789'
  let junk = ''
  while (junk.length < length) junk += alphabet.charAt(rng.int(0, alphabet.length - 1)).repeat(rng.int(1, 64))
  return `${text.slice(0, -1)},"diag":"${junk.slice(0, length)}"}`
}

/** Turns a valid reading into a broken message of a random (or the given) kind. */
export function makeFault(reading: Reading, rng: Random, kind?: FaultKind): FaultyMessage {
  const k = kind ?? rng.pick(FAULT_KINDS)
  switch (k) {
    case 'malformed-json':
      return { kind: k, payload: malformed(reading, rng) }
    case 'wrong-type':
      return { kind: k, payload: wrongType(reading, rng) }
    case 'nan-like':
      return { kind: k, payload: nanLike(reading, rng) }
    case 'out-of-range':
      return { kind: k, payload: outOfRange(reading, rng) }
    case 'future-ts':
      return { kind: k, payload: futureTs(reading, rng) }
    case 'oversize':
      return { kind: k, payload: oversize(reading, rng) }
  }
}
