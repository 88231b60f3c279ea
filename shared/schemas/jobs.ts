import { z } from 'zod'

// Input shapes for jobs (repair orders), their finish plans, coats, mixes and booth screens, shared
// by the forms and the routes.

export const JOB_STATUSES = ['planned', 'in_booth', 'curing', 'done'] as const
export type JobStatusValue = (typeof JOB_STATUSES)[number]
export const JobStatusSchema = z.enum(JOB_STATUSES, { error: 'Choose one of: planned, in booth, curing, done' })

export const MAX_STEPS = 12
export const MAX_COATS_PER_STEP = 6

const id = (what: string) => z.number({ error: `Choose ${what}` }).int(`Choose ${what}`).positive(`Choose ${what}`)
const optionalId = (what: string) => id(what).nullable().optional()
const isoTime = z.iso.datetime({ offset: true, error: 'Use an ISO 8601 date-time' })

export const FinishStepSchema = z.object({
  /** An existing step keeps its id (and its coats); a new step has none. */
  id: id('a step').optional(),
  revisionId: id('a product revision'),
  coatsPlanned: z
    .number({ error: 'Enter the number of coats' })
    .int('Whole coats only')
    .min(1, 'At least 1 coat')
    .max(MAX_COATS_PER_STEP, `At most ${MAX_COATS_PER_STEP} coats`),
  note: z.string().trim().max(300, 'At most 300 characters').default(''),
})
export type FinishStepInput = z.input<typeof FinishStepSchema>

export const FinishPlanSchema = z.object({
  steps: z.array(FinishStepSchema).max(MAX_STEPS, `At most ${MAX_STEPS} steps`),
})

const JobFields = {
  number: z
    .string({ error: 'Enter the repair order number' })
    .trim()
    .min(1, 'Enter the repair order number')
    .max(40, 'At most 40 characters')
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Letters, digits, spaces and . _ / - only'),
  vehicle: z.string({ error: 'Describe the vehicle' }).trim().min(1, 'Describe the vehicle').max(200, 'At most 200 characters'),
  colourCode: z.string().trim().max(40, 'At most 40 characters').default(''),
  panels: z.array(z.string().trim().min(1, 'A panel needs a name').max(60, 'At most 60 characters')).max(30, 'At most 30 panels').default([]),
  notes: z.string().trim().max(2000, 'At most 2000 characters').default(''),
  painterId: optionalId('a painter'),
  boothId: optionalId('a booth'),
}

export const CreateJobSchema = z.object({
  ...JobFields,
  steps: z.array(FinishStepSchema.omit({ id: true })).max(MAX_STEPS, `At most ${MAX_STEPS} steps`).default([]),
})
export type CreateJobInput = z.input<typeof CreateJobSchema>

export const UpdateJobSchema = z
  .object({
    number: JobFields.number.optional(),
    vehicle: JobFields.vehicle.optional(),
    colourCode: z.string().trim().max(40, 'At most 40 characters').optional(),
    panels: z.array(z.string().trim().min(1).max(60)).max(30).optional(),
    notes: z.string().trim().max(2000).optional(),
    painterId: optionalId('a painter'),
    boothId: optionalId('a booth'),
    status: JobStatusSchema.optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: 'Nothing to change' })
export type UpdateJobInput = z.input<typeof UpdateJobSchema>

export const JobListQuerySchema = z.object({
  status: z.union([JobStatusSchema, z.literal('active'), z.literal('all')]).default('all'),
  boothId: z.coerce.number().int().positive().optional(),
})

/** Who acts on a booth screen: the painter tapped their name and typed their PIN. Not needed when signed in. */
export const ActorSchema = z.object({
  painterId: id('your name').optional(),
  pin: z.string().regex(/^\d{4,6}$/, 'A PIN is 4 to 6 digits').optional(),
})

export const OverrideReasonSchema = z.string().trim().min(3, 'Give a reason of at least 3 characters').max(500, 'At most 500 characters')

export const StartCoatSchema = ActorSchema.extend({
  jobId: id('a job'),
  stepId: id('a step'),
  /** The coat the screen showed as next; a different next coat (the plan moved on) is refused with 409. */
  coatNumber: z.number().int().min(1).max(MAX_COATS_PER_STEP),
  /** Why the painter goes past a guard rail (early start, outside the application window, near the dew point). */
  reason: OverrideReasonSchema.optional(),
  /** When the coat started, if entered afterwards (within the last 12 h); default now. */
  at: isoTime.optional(),
})
export type StartCoatInput = z.input<typeof StartCoatSchema>

export const FinishCoatSchema = ActorSchema.extend({
  at: isoTime.optional(),
})

export const LogMixSchema = ActorSchema.extend({
  boothId: id('a booth'),
  jobId: id('a job').optional(),
  stepId: id('a step').optional(),
  revisionId: id('the product revision'),
  reducerGrade: z.string().trim().max(40, 'At most 40 characters').optional(),
  amountMl: z.number({ error: 'Enter the amount in millilitres' }).positive('The amount must be above 0').max(20_000, 'At most 20 000 ml').optional(),
  mixedAt: isoTime.optional(),
})
export type LogMixInput = z.input<typeof LogMixSchema>

export const CloseMixSchema = ActorSchema.extend({
  outcome: z.enum(['used', 'discarded'], { error: 'Choose used or discarded' }),
})

export const PairScreenSchema = z.object({
  code: z.string({ error: 'Enter the pairing code' }).trim().min(1, 'Enter the pairing code').max(20, 'A pairing code is 6 characters'),
})

export const PinCheckSchema = z.object({
  painterId: id('your name'),
  pin: z.string({ error: 'Enter your PIN' }).regex(/^\d{4,6}$/, 'A PIN is 4 to 6 digits'),
})
