// The catalogue of watch kinds, their shop defaults, and the schema that validates a manager's rule.
//
// Every default below is an invented demo value inside the range commonly used in refinish shops, not a figure
// from any one paint system's data sheet; a shop should set its own from its products' TDS and its booth.
// Parsing a minimal rule ({ id, kind } plus a channel where there is a choice) fills in these defaults.

import { z } from 'zod'
import { BOOTH_MODES, WATCH_CHANNELS, type BoothMode } from './reading'

const SECOND = 1000
const MINUTE = 60 * SECOND
const HOUR = 60 * MINUTE

export const WATCH_DEFAULTS = {
  // Common practice: below ~40 %RH waterborne basecoat flashes too fast (dry spray, mottling), above ~70 %RH it
  // flashes slowly and can blush. Hysteresis 2 %RH ≈ the accuracy of a typical capacitive RH sensor.
  rh_band: { lowPct: 40, highPct: 70, hysteresis: 2, openAfterMs: 2 * MINUTE, clearAfterMs: MINUTE },
  // Common practice: many refinish products ask for at least ~15 °C to apply and cure, and above ~35 °C solvent
  // flashes off too fast. 1 °C hysteresis; 2 min before opening rides out a door opening.
  air_temp_band: { lowC: 15, highC: 35, hysteresis: 1, openAfterMs: 2 * MINUTE, clearAfterMs: MINUTE },
  // Coatings practice: surface at least 3 °C (5 °F) above the dew point (DESIGN.md §6), else condensation risk.
  dew_point_margin: { minC: 3, hysteresis: 0.5, openAfterMs: MINUTE, clearAfterMs: MINUTE },
  // Common practice for downdraft booths: 0.25–0.5 m/s air velocity at the work; 0.3 m/s as the minimum while
  // spraying. Short delays: overspray removal matters as soon as the gun is used.
  airflow_min_in_spray: { minMps: 0.3, hysteresis: 0.03, openAfterMs: 15 * SECOND, clearAfterMs: 15 * SECOND },
  // Common practice: a slight positive pressure (a few Pa) keeps dust out without pushing overspray out of the
  // doors; 2–15 Pa accepted. 30 s rides out a door opening.
  booth_pressure_band: { lowPa: 2, highPa: 15, hysteresis: 0.5, openAfterMs: 30 * SECOND, clearAfterMs: 30 * SECOND },
  // Common practice: change filters at the loaded pressure drop their maker states; 250 Pa intake (ceiling media)
  // and 150 Pa exhaust (overspray arrestor) are demo values. Loading is slow, so 5 min before opening.
  filter_dp_max: {
    intakeMaxPa: 250,
    exhaustMaxPa: 150,
    hysteresis: 10,
    openAfterMs: 5 * MINUTE,
    clearAfterMs: MINUTE,
  },
  // Sensors publish about once a second; a minute of nothing is a fault, not a hiccup.
  sensor_silence: { silentAfterMs: MINUTE },
  // Common practice for low-bake refinish: about 60 °C, reached within about 15 min of switching to bake.
  bake_not_reaching_temp: { targetC: 60, withinMs: 15 * MINUTE },
  // Demo target and σ: set both from the booth's own history of 1-minute means (σ of the means, not of readings).
  // k = 0.5 and h = 5: see cusum.ts. capSigma = 2h bounds how long an alert outlives the drift.
  rh_cusum: {
    targetPct: 55,
    sigmaPct: 1.5,
    k: 0.5,
    h: 5,
    subgroupMs: MINUTE,
    minSubgroupCount: 30, // at least half of the 60 readings a 1 Hz sensor sends per minute
    clearFraction: 0,
    capSigma: 10,
  },
} as const

// A prep deck (an open-front or curtained prep station) moves less air and holds only a slight overpressure, so
// the downdraft figures above would alarm all day there. Common practice puts prep stations around 0.25 m/s at the
// work and just above neutral pressure; 0.25 m/s and 0.5–10 Pa are demo values in that range (from memory, no
// single source). Only the fields that differ are listed.
export const PREP_DECK_WATCH_DEFAULTS = {
  airflow_min_in_spray: { minMps: 0.25 },
  booth_pressure_band: { lowPa: 0.5, highPa: 10 },
} as const

/** Booth kinds whose shop defaults differ from the downdraft figures (the booths table's kind). */
export type WatchDefaultsKind = 'downdraft' | 'semi_downdraft' | 'crossdraft' | 'prep_deck'

// Booth modes in which a watch applies by default. Heating in bake drives RH far down and temperature up, and an
// idle booth has its fans off: those readings say nothing about painting conditions.
export const DEFAULT_ACTIVE_WHEN = {
  paint: ['spray', 'flash'],
  fansOn: ['spray', 'flash', 'bake', 'cool'],
} as const satisfies Record<string, readonly BoothMode[]>

const ModeSchema = z.enum(BOOTH_MODES, { error: `Choose booth modes from: ${BOOTH_MODES.join(', ')}` })

const activeWhen = (fallback: readonly BoothMode[]) =>
  z
    .array(ModeSchema, { error: 'activeWhen is a list of booth modes' })
    .min(1, 'activeWhen needs at least one booth mode (remove the rule to switch it off)')
    .default([...fallback])

const ms = (what: string, fallback: number, min = 0, max = 24 * HOUR) =>
  z
    .number({ error: `${what} must be a number of milliseconds` })
    .int(`${what} must be a whole number of milliseconds`)
    .min(min, `${what} must be at least ${min} ms`)
    .max(max, `${what} must be at most ${max} ms`)
    .default(fallback)

const num = (what: string, unit: string, min: number, max: number, fallback: number) =>
  z
    .number({ error: `${what} must be a number (${unit})` })
    .min(min, `${what} must be at least ${min} ${unit}`)
    .max(max, `${what} must be at most ${max} ${unit}`)
    .default(fallback)

const hysteresis = (unit: string, fallback: number) =>
  num('hysteresis', unit, 0, 1000, fallback)

/** For kinds whose timing lives in params: the common fields exist for a uniform shape and must stay 0. */
const unused = (field: string, kind: string) =>
  z.literal(0, { error: `${field} is not used by ${kind}; leave it at 0` }).default(0)

const common = {
  id: z
    .string({ error: 'Give the rule an id' })
    .trim()
    .min(1, 'Give the rule an id')
    .max(64, 'Use at most 64 characters for the id'),
  label: z.string().trim().max(80, 'Use at most 80 characters for the label').optional(),
  enabled: z.boolean({ error: 'enabled must be true or false' }).default(true),
}

// A band must have room for its hysteresis on both sides, else it could never clear.
function bandCheck(low: number, high: number, hy: number, unit: string, ctx: z.RefinementCtx): void {
  if (!(low < high)) {
    ctx.addIssue({ code: 'custom', path: ['params'], message: `The low limit must be below the high limit (${unit})` })
  } else if (!(hy < (high - low) / 2)) {
    ctx.addIssue({ code: 'custom', path: ['hysteresis'], message: `hysteresis must be less than half the band (${(high - low) / 2} ${unit})` })
  }
}

const D = WATCH_DEFAULTS

const RhBandSchema = z
  .object({
    ...common,
    kind: z.literal('rh_band'),
    channel: z.literal('rhPct', { error: 'rh_band watches rhPct' }).default('rhPct'),
    params: z
      .object({
        lowPct: num('params.lowPct', '%RH', 0, 100, D.rh_band.lowPct),
        highPct: num('params.highPct', '%RH', 0, 100, D.rh_band.highPct),
      })
      .prefault({}),
    openAfterMs: ms('openAfterMs', D.rh_band.openAfterMs),
    clearAfterMs: ms('clearAfterMs', D.rh_band.clearAfterMs),
    hysteresis: hysteresis('%RH', D.rh_band.hysteresis),
    activeWhen: activeWhen(DEFAULT_ACTIVE_WHEN.paint),
  })
  .superRefine((r, ctx) => bandCheck(r.params.lowPct, r.params.highPct, r.hysteresis, '%RH', ctx))

const AirTempBandSchema = z
  .object({
    ...common,
    kind: z.literal('air_temp_band'),
    channel: z.literal('airTempC', { error: 'air_temp_band watches airTempC' }).default('airTempC'),
    params: z
      .object({
        lowC: num('params.lowC', '°C', -40, 150, D.air_temp_band.lowC),
        highC: num('params.highC', '°C', -40, 150, D.air_temp_band.highC),
      })
      .prefault({}),
    openAfterMs: ms('openAfterMs', D.air_temp_band.openAfterMs),
    clearAfterMs: ms('clearAfterMs', D.air_temp_band.clearAfterMs),
    hysteresis: hysteresis('°C', D.air_temp_band.hysteresis),
    activeWhen: activeWhen(DEFAULT_ACTIVE_WHEN.paint),
  })
  .superRefine((r, ctx) => bandCheck(r.params.lowC, r.params.highC, r.hysteresis, '°C', ctx))

const DewPointMarginSchema = z.object({
  ...common,
  kind: z.literal('dew_point_margin'),
  channel: z.literal('dewPointMarginC', { error: 'dew_point_margin watches dewPointMarginC' }).default('dewPointMarginC'),
  params: z.object({ minC: num('params.minC', '°C', 0, 30, D.dew_point_margin.minC) }).prefault({}),
  openAfterMs: ms('openAfterMs', D.dew_point_margin.openAfterMs),
  clearAfterMs: ms('clearAfterMs', D.dew_point_margin.clearAfterMs),
  hysteresis: hysteresis('°C', D.dew_point_margin.hysteresis),
  activeWhen: activeWhen(DEFAULT_ACTIVE_WHEN.paint),
})

// Spray-only by definition, so no activeWhen.
const AirflowMinSchema = z.object({
  ...common,
  kind: z.literal('airflow_min_in_spray'),
  channel: z.literal('airflowMps', { error: 'airflow_min_in_spray watches airflowMps' }).default('airflowMps'),
  params: z.object({ minMps: num('params.minMps', 'm/s', 0, 5, D.airflow_min_in_spray.minMps) }).prefault({}),
  openAfterMs: ms('openAfterMs', D.airflow_min_in_spray.openAfterMs),
  clearAfterMs: ms('clearAfterMs', D.airflow_min_in_spray.clearAfterMs),
  hysteresis: hysteresis('m/s', D.airflow_min_in_spray.hysteresis),
})

const BoothPressureSchema = z
  .object({
    ...common,
    kind: z.literal('booth_pressure_band'),
    channel: z.literal('boothDpPa', { error: 'booth_pressure_band watches boothDpPa' }).default('boothDpPa'),
    params: z
      .object({
        lowPa: num('params.lowPa', 'Pa', -500, 500, D.booth_pressure_band.lowPa),
        highPa: num('params.highPa', 'Pa', -500, 500, D.booth_pressure_band.highPa),
      })
      .prefault({}),
    openAfterMs: ms('openAfterMs', D.booth_pressure_band.openAfterMs),
    clearAfterMs: ms('clearAfterMs', D.booth_pressure_band.clearAfterMs),
    hysteresis: hysteresis('Pa', D.booth_pressure_band.hysteresis),
    activeWhen: activeWhen(DEFAULT_ACTIVE_WHEN.fansOn),
  })
  .superRefine((r, ctx) => bandCheck(r.params.lowPa, r.params.highPa, r.hysteresis, 'Pa', ctx))

// The channel picks the filter bank; maxPa defaults to the intake figure, so give it for an exhaust rule.
const FilterDpSchema = z.object({
  ...common,
  kind: z.literal('filter_dp_max'),
  channel: z.enum(['intakeFilterDpPa', 'exhaustFilterDpPa'], {
    error: 'filter_dp_max watches intakeFilterDpPa or exhaustFilterDpPa',
  }),
  params: z.object({ maxPa: num('params.maxPa', 'Pa', 1, 2000, D.filter_dp_max.intakeMaxPa) }).prefault({}),
  openAfterMs: ms('openAfterMs', D.filter_dp_max.openAfterMs),
  clearAfterMs: ms('clearAfterMs', D.filter_dp_max.clearAfterMs),
  hysteresis: hysteresis('Pa', D.filter_dp_max.hysteresis),
  // Optional: a clogged filter shows with fans on, and a low drop with fans off is no alarm for a maximum.
  activeWhen: z
    .array(ModeSchema, { error: 'activeWhen is a list of booth modes' })
    .min(1, 'activeWhen needs at least one booth mode (leave it out to watch in every mode)')
    .optional(),
})

const SensorSilenceSchema = z.object({
  ...common,
  kind: z.literal('sensor_silence'),
  channel: z
    .enum(['any', ...WATCH_CHANNELS], { error: `sensor_silence watches "any" or one of: ${WATCH_CHANNELS.join(', ')}` })
    .default('any'),
  params: z
    .object({ silentAfterMs: ms('params.silentAfterMs', D.sensor_silence.silentAfterMs, SECOND) })
    .prefault({}),
  openAfterMs: unused('openAfterMs', 'sensor_silence (use params.silentAfterMs)'),
  clearAfterMs: unused('clearAfterMs', 'sensor_silence (the next reading clears it)'),
  hysteresis: unused('hysteresis', 'sensor_silence'),
})

const BakeTempSchema = z.object({
  ...common,
  kind: z.literal('bake_not_reaching_temp'),
  channel: z
    .enum(['panelTempC', 'airTempC'], { error: 'bake_not_reaching_temp watches panelTempC or airTempC' })
    .default('airTempC'),
  params: z
    .object({
      targetC: num('params.targetC', '°C', 20, 150, D.bake_not_reaching_temp.targetC),
      withinMs: ms('params.withinMs', D.bake_not_reaching_temp.withinMs, MINUTE, 4 * HOUR),
    })
    .prefault({}),
  openAfterMs: unused('openAfterMs', 'bake_not_reaching_temp (use params.withinMs)'),
  clearAfterMs: unused('clearAfterMs', 'bake_not_reaching_temp (reaching the target clears it)'),
  hysteresis: unused('hysteresis', 'bake_not_reaching_temp'),
})

const C = D.rh_cusum
const RhCusumSchema = z
  .object({
    ...common,
    kind: z.literal('rh_cusum'),
    channel: z.literal('rhPct', { error: 'rh_cusum watches rhPct' }).default('rhPct'),
    params: z
      .object({
        targetPct: num('params.targetPct', '%RH', 0, 100, C.targetPct),
        sigmaPct: num('params.sigmaPct', '%RH', 0.01, 50, C.sigmaPct),
        k: num('params.k', 'σ', 0, 3, C.k),
        h: num('params.h', 'σ', 0.5, 20, C.h),
        subgroupMs: ms('params.subgroupMs', C.subgroupMs, SECOND, HOUR),
        minSubgroupCount: z
          .number({ error: 'params.minSubgroupCount must be a whole number of readings' })
          .int('params.minSubgroupCount must be a whole number of readings')
          .min(1, 'params.minSubgroupCount must be at least 1')
          .max(100_000)
          .default(C.minSubgroupCount),
        clearFraction: z
          .number({ error: 'params.clearFraction must be a number from 0 to below 1' })
          .min(0, 'params.clearFraction must be at least 0')
          .lt(1, 'params.clearFraction must be below 1 (else it would clear while still over h)')
          .default(C.clearFraction),
        capSigma: z.number({ error: 'params.capSigma must be a number (σ) or null' }).nullable().default(C.capSigma),
      })
      .prefault({})
      .superRefine((p, ctx) => {
        if (p.capSigma !== null && !(p.capSigma > p.h)) {
          ctx.addIssue({ code: 'custom', path: ['capSigma'], message: 'params.capSigma must be above params.h (or null)' })
        }
      }),
    openAfterMs: unused('openAfterMs', 'rh_cusum (h sets when it opens)'),
    clearAfterMs: unused('clearAfterMs', 'rh_cusum (clearFraction sets when it clears)'),
    hysteresis: unused('hysteresis', 'rh_cusum'),
    activeWhen: activeWhen(DEFAULT_ACTIVE_WHEN.paint),
  })

export const WATCH_KINDS = [
  'rh_band',
  'air_temp_band',
  'dew_point_margin',
  'airflow_min_in_spray',
  'booth_pressure_band',
  'filter_dp_max',
  'sensor_silence',
  'bake_not_reaching_temp',
  'rh_cusum',
] as const

export const WatchRuleSchema = z.discriminatedUnion(
  'kind',
  [
    RhBandSchema,
    AirTempBandSchema,
    DewPointMarginSchema,
    AirflowMinSchema,
    BoothPressureSchema,
    FilterDpSchema,
    SensorSilenceSchema,
    BakeTempSchema,
    RhCusumSchema,
  ],
  { error: `kind must be one of: ${WATCH_KINDS.join(', ')}` },
)

/** A booth's whole rule set: ids must be unique, since state and alerts are keyed by them. */
export const WatchRuleListSchema = z.array(WatchRuleSchema).superRefine((rules, ctx) => {
  const seen = new Set<string>()
  rules.forEach((r, i) => {
    if (seen.has(r.id)) ctx.addIssue({ code: 'custom', path: [i, 'id'], message: `Rule id "${r.id}" is used twice` })
    seen.add(r.id)
  })
})

export type WatchRule = z.output<typeof WatchRuleSchema>
export type WatchRuleInput = z.input<typeof WatchRuleSchema>
export type WatchKind = WatchRule['kind']

export const WATCH_KIND_LABELS: Record<WatchKind, string> = {
  rh_band: 'Humidity out of range',
  air_temp_band: 'Air temperature out of range',
  dew_point_margin: 'Too close to dew point',
  airflow_min_in_spray: 'Low airflow while spraying',
  booth_pressure_band: 'Booth pressure out of range',
  filter_dp_max: 'Filter loaded',
  sensor_silence: 'Sensor silent',
  bake_not_reaching_temp: 'Bake not reaching temperature',
  rh_cusum: 'Humidity drift',
}

/**
 * A new booth's rule set: every kind once, filters once per bank, all at the shop defaults for its kind of booth
 * (a prep deck has its own airflow and pressure figures; the others use the downdraft ones).
 */
export function defaultWatchRules(boothKind: WatchDefaultsKind = 'downdraft'): WatchRule[] {
  const prep = boothKind === 'prep_deck'
  const inputs: WatchRuleInput[] = [
    { id: 'rh-band', kind: 'rh_band' },
    { id: 'air-temp-band', kind: 'air_temp_band' },
    { id: 'dew-point-margin', kind: 'dew_point_margin' },
    { id: 'airflow-min', kind: 'airflow_min_in_spray', ...(prep && { params: { ...PREP_DECK_WATCH_DEFAULTS.airflow_min_in_spray } }) },
    { id: 'booth-pressure', kind: 'booth_pressure_band', ...(prep && { params: { ...PREP_DECK_WATCH_DEFAULTS.booth_pressure_band } }) },
    { id: 'intake-filter', kind: 'filter_dp_max', channel: 'intakeFilterDpPa' },
    { id: 'exhaust-filter', kind: 'filter_dp_max', channel: 'exhaustFilterDpPa', params: { maxPa: D.filter_dp_max.exhaustMaxPa } },
    { id: 'sensor-silence', kind: 'sensor_silence' },
    { id: 'bake-temp', kind: 'bake_not_reaching_temp' },
    { id: 'rh-drift', kind: 'rh_cusum' },
  ]
  return inputs.map((r) => WatchRuleSchema.parse(r))
}
