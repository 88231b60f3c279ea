// zod input schemas for the bake and upkeep routes and forms (SI units).
import { z } from 'zod'
import { CALIBRATED_CHANNELS } from './channels'
import { INSPECTION_KEYS } from './inspection'
import { RULE_TASKS } from './reminders'

const iso = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO 8601 date-time` })
const notes = z.string().trim().max(2000, 'at most 2000 characters')
const id = z.coerce.number().int().positive()
/** Object temperature a bake may hold, °C (the cure engine's range tops out at 200 °C). */
const bakeTemp = z.number().min(20, 'at least 20 °C').max(200, 'at most 200 °C')
const pressure = z.number().min(0, 'cannot be negative').max(5000, 'at most 5000 Pa')

export const StartBakeBody = z.object({
  boothId: z.number().int().positive(),
  startedAt: iso('startedAt').optional(),
  targetC: bakeTemp.nullable().optional(),
  notes: notes.optional(),
})

export const ConfirmBakeBody = z.object({
  targetC: bakeTemp.nullable().optional(),
  notes: notes.optional(),
})

export const EndBakeBody = z.object({ endedAt: iso('endedAt').optional() })

export const DismissBakeBody = z.object({
  reason: z.string().trim().min(3, 'say briefly why this was not a bake').max(500, 'at most 500 characters'),
})

export const SignOffBody = z.object({ notes: notes.default('') })

export const BAKE_STATES = ['detected', 'confirmed', 'signed_off', 'dismissed'] as const

export const BakeListQuery = z.object({
  state: z.enum([...BAKE_STATES, 'running', 'to_confirm']).optional(),
  boothId: id.optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
})

export const FilterChangeBody = z.object({
  boothId: z.number().int().positive(),
  filter: z.enum(['intake', 'exhaust']),
  changedAt: iso('changedAt').optional(),
  dpBeforePa: pressure.nullable().optional(),
  dpAfterPa: pressure.nullable().optional(),
  notes: notes.optional(),
})

export const CalibrationBody = z.object({
  boothId: z.number().int().positive(),
  channel: z.enum(CALIBRATED_CHANNELS),
  effectiveAt: iso('effectiveAt').optional(),
  /** What the reference instrument read, in the channel's SI unit. */
  referenceValue: z.number().finite(),
  /** What the booth sensor reported at the same moment (raw, before any offset). */
  sensorValue: z.number().finite(),
  instrument: z.string().trim().max(200).default(''),
  nextDueAt: iso('nextDueAt').nullable().optional(),
  notes: notes.optional(),
})

export const InspectionBody = z
  .object({
    boothId: z.number().int().positive(),
    inspectedAt: iso('inspectedAt').optional(),
    items: z
      .array(z.object({ key: z.enum(INSPECTION_KEYS as [string, ...string[]]), ok: z.boolean(), note: z.string().trim().max(500).optional() }))
      .min(1),
    notes: notes.optional(),
  })
  .refine((b) => INSPECTION_KEYS.every((k) => b.items.filter((i) => i.key === k).length === 1), {
    message: 'every checklist item once',
    path: ['items'],
  })

export const NoteBody = z.object({
  boothId: z.number().int().positive(),
  kind: z.enum(['note', 'heater_service']).default('note'),
  notedAt: iso('notedAt').optional(),
  text: z.string().trim().min(1, 'write a few words').max(4000, 'at most 4000 characters'),
})

const interval = z.number().positive('must be above zero').max(100_000).nullable().optional()

export const RuleBody = z.object({
  boothId: z.number().int().positive(),
  task: z.enum(RULE_TASKS as [string, ...string[]]),
  intervalDays: interval,
  intervalBoothHours: interval,
  intervalBakeCycles: z.number().int().positive().max(100_000).nullable().optional(),
  dpLimitPa: z.number().positive().max(5000).nullable().optional(),
  trendHorizonDays: z.number().positive().max(365).nullable().optional(),
})

export const BoothQuery = z.object({ boothId: id.optional() })

export const RangeQuery = z
  .object({
    from: iso('from').optional(),
    to: iso('to').optional(),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { message: 'from must be before to', path: ['from'] })

export type StartBakeInput = z.output<typeof StartBakeBody>
export type FilterChangeInput = z.output<typeof FilterChangeBody>
export type CalibrationInput = z.output<typeof CalibrationBody>
export type InspectionInput = z.output<typeof InspectionBody>
export type NoteInput = z.output<typeof NoteBody>
export type RuleInput = z.output<typeof RuleBody>
