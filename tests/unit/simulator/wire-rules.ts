// Local mirror of the wire format rules (DESIGN.md §4 and the simulator brief), written independently of the
// simulator code so the tests check the simulator against the rules rather than against itself.
import { z } from 'zod'

export const MAX_PAYLOAD_BYTES = 8192
export const MAX_AHEAD_MS = 5 * 60_000

const temperature = z.number().min(-40).max(150)

export const readingSchema = z.strictObject({
  ts: z.iso.datetime(),
  seq: z.number().int().nonnegative().optional(),
  airTempC: temperature.optional(),
  rhPct: z.number().min(0).max(100).optional(),
  panelTempC: temperature.optional(),
  airflowMps: z.number().min(0).optional(),
  boothDpPa: z.number().optional(),
  intakeFilterDpPa: z.number().optional(),
  exhaustFilterDpPa: z.number().optional(),
  heaterOn: z.boolean().optional(),
})

export const modeSchema = z.strictObject({
  ts: z.iso.datetime(),
  mode: z.enum(['idle', 'spray', 'flash', 'bake', 'cool']),
})

export type WireCheck = { ok: true } | { ok: false; reason: string }

/** Checks one reading payload as a receiver with clock `receivedAtMs` would. */
export function checkReadingPayload(payload: string, receivedAtMs: number): WireCheck {
  if (Buffer.byteLength(payload, 'utf8') > MAX_PAYLOAD_BYTES) return { ok: false, reason: 'oversize' }
  let parsed: unknown
  try {
    parsed = JSON.parse(payload)
  } catch {
    return { ok: false, reason: 'malformed-json' }
  }
  const result = readingSchema.safeParse(parsed)
  if (!result.success) return { ok: false, reason: `schema: ${result.error.issues[0]?.message ?? 'invalid'}` }
  const tsMs = Date.parse(result.data.ts)
  if (!Number.isFinite(tsMs)) return { ok: false, reason: 'ts unparseable' }
  if (tsMs > receivedAtMs + MAX_AHEAD_MS) return { ok: false, reason: 'ts in the future' }
  return { ok: true }
}
