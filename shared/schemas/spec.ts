import { z } from 'zod'
import { cToF, fToC } from '../cure/units'

// Input shapes of products and spec revisions, shared by the forms and the routes. Everything is
// stored in SI (°C, minutes, %, m/s). A revision may be sent in °F with `unit: 'F'`: its
// temperatures are then checked against the same ranges expressed in °F (so messages speak the
// sender's unit) and converted to °C before anything else sees them.

// ── products ────────────────────────────────────────────────────────────────────────────────────

export const PRODUCT_CATEGORIES = ['primer_surfacer', 'sealer', 'wet_bed_binder', 'basecoat', 'clearcoat', 'other'] as const
export type ProductCategory = (typeof PRODUCT_CATEGORIES)[number]
export const CATEGORY_LABELS: Record<ProductCategory, string> = {
  primer_surfacer: 'Primer surfacer',
  sealer: 'Sealer',
  wet_bed_binder: 'Wet-bed binder',
  basecoat: 'Basecoat',
  clearcoat: 'Clearcoat',
  other: 'Other',
}

export const CHEMISTRIES = ['solvent', 'waterborne'] as const
export type Chemistry = (typeof CHEMISTRIES)[number]
export const CHEMISTRY_LABELS: Record<Chemistry, string> = { solvent: 'Solvent-borne', waterborne: 'Waterborne' }

export type Components = 1 | 2

/** What the engine needs to know of the product a revision belongs to. */
export interface ProductEngineFields {
  chemistry: Chemistry
  components: Components
}

const ProductName = z
  .string({ error: 'Enter the product name' })
  .trim()
  .min(1, 'Enter the product name')
  .max(120, 'Use at most 120 characters')
const Category = z.enum(PRODUCT_CATEGORIES, {
  error: 'Choose a category: primer surfacer, sealer, wet-bed binder, basecoat, clearcoat or other',
})
const ChemistryField = z.enum(CHEMISTRIES, { error: 'Choose solvent-borne or waterborne' })
const ComponentsField = z.literal([1, 2], { error: 'Choose 1 (1K, one component) or 2 (2K, with hardener)' })
const Notes = z.string({ error: 'Notes are text' }).trim().max(2000, 'Use at most 2000 characters')

export const ProductInputSchema = z.object({
  name: ProductName,
  category: Category,
  chemistry: ChemistryField,
  components: ComponentsField,
  notes: Notes.optional().transform((v) => v ?? ''),
})
export type ProductInput = z.output<typeof ProductInputSchema>

export const ProductPatchSchema = z
  .object({
    name: ProductName.optional(),
    category: Category.optional(),
    chemistry: ChemistryField.optional(),
    components: ComponentsField.optional(),
    notes: Notes.optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: 'Nothing to change' })
export type ProductPatch = z.output<typeof ProductPatchSchema>

// ── revisions ───────────────────────────────────────────────────────────────────────────────────

export type TemperatureUnit = 'C' | 'F'
export const TEMPERATURE_UNITS: readonly TemperatureUnit[] = ['C', 'F']

/** A reducer band of the TDS: [fromC, toC) → grade; null = open-ended (first / last band only). */
export interface ReducerBandInput {
  fromC: number | null
  toC: number | null
  grade: string
}
/** A bake (force-dry) schedule: minutes at an object (panel) temperature. */
export interface BakeSchedule {
  objectTempC: number
  minutes: number
}
/** A row of a solvent-borne flash table: flash minutes at an air temperature. */
export interface FlashTableRow {
  tempC: number
  minutes: number
}

/** Every field of a spec revision, SI. Optional data-sheet values are null when the TDS gives none. */
export interface SpecRevisionFields {
  /** Temperature the TDS times hold at, °C. */
  refTempC: number
  /** Flash between coats at refTempC, minutes (min–max of the TDS). */
  flashMinMinutes: number
  flashMaxMinutes: number
  /** Flash before the next product (e.g. basecoat before clear), minutes at refTempC. */
  flashBeforeNextMinutes: number
  /** Latest time, equivalent minutes at refTempC, for the next coat / product without sanding. */
  recoatWindowMinutes: number | null
  coats: number
  /** Pot life of the mixed product at refTempC, minutes (required for 2K). */
  potLifeMinutes: number | null
  /** Mix ratio by volume as the TDS writes it, e.g. "4:1:1" (required for 2K). */
  mixRatio: string | null
  reducerBands: ReducerBandInput[]
  /** Application limits: air (and panel) temperature °C, relative humidity %. */
  minAirTempC: number | null
  maxAirTempC: number | null
  minRhPct: number | null
  maxRhPct: number | null
  /** Air-dry times at refTempC, minutes. */
  dustFreeMinutes: number | null
  handleMinutes: number | null
  sandPolishMinutes: number | null
  bakeSchedules: BakeSchedule[]
  /** No cure below this panel temperature, °C (required with bake schedules). */
  minCureTempC: number | null
  /** Rate factor per 10 °C (default 2); used for solvent flash without a table, pot life, and cure when no two schedule points give Ea. */
  q10: number
  /** Solvent-borne flash times at several temperatures (≥ 2 rows), or null. */
  flashTable: FlashTableRow[] | null
  /** Waterborne reference humidity %, air velocity m/s and airflow exponent (null → engine defaults 50 %, 0.3 m/s, 0.5). */
  wbRefRhPct: number | null
  wbRefAirflowMps: number | null
  wbAirflowExponent: number | null
}

export const SPEC_REVISION_FIELDS = [
  'refTempC',
  'flashMinMinutes',
  'flashMaxMinutes',
  'flashBeforeNextMinutes',
  'recoatWindowMinutes',
  'coats',
  'potLifeMinutes',
  'mixRatio',
  'reducerBands',
  'minAirTempC',
  'maxAirTempC',
  'minRhPct',
  'maxRhPct',
  'dustFreeMinutes',
  'handleMinutes',
  'sandPolishMinutes',
  'bakeSchedules',
  'minCureTempC',
  'q10',
  'flashTable',
  'wbRefRhPct',
  'wbRefAirflowMps',
  'wbAirflowExponent',
] as const satisfies readonly (keyof SpecRevisionFields)[]

/** Accepted ranges, SI. Temperatures are checked in the sender's unit (these bounds converted). */
export const SPEC_LIMITS = {
  refTempC: [5, 40],
  flashMinutes: [0.5, 240],
  flashBeforeNextMinutes: [1, 240],
  recoatWindowMinutes: [1, 10_080],
  coats: [1, 6],
  potLifeMinutes: [5, 1_440],
  bandEdgeC: [-20, 60],
  airTempC: [-10, 60],
  rhPct: [0, 100],
  airDryMinutes: [1, 10_080],
  bakeObjectTempC: [15, 160],
  bakeMinutes: [1, 10_080],
  minCureTempC: [-10, 60],
  q10: [1, 5],
  tableTempC: [-10, 50],
  wbRefRhPct: [0, 95],
  wbRefAirflowMps: [0.05, 2],
  wbAirflowExponent: [0, 1],
  maxReducerBands: 8,
  maxBakeSchedules: 6,
  maxFlashTableRows: 8,
} as const

/** Largest TDS upload, bytes (20 MB = 20 × 1024 × 1024). */
export const TDS_MAX_BYTES = 20 * 1024 * 1024

const MIX_RATIO = /^\d{1,3}(\.\d{1,2})?(:\d{1,3}(\.\d{1,2})?){1,3}$/

const round1 = (v: number) => Math.round(v * 10) / 10
const fmt = (v: number) => String(round1(v)).replace('-', '−')
const symbolOf = (u: TemperatureUnit) => (u === 'F' ? '°F' : '°C')
const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)

/** A number field: "Enter …" when missing, "… must be between a and b unit" out of range. */
function num(label: string, [min, max]: readonly [number, number], unit: string, opts: { int?: boolean } = {}) {
  const range = `${cap(label)} must be between ${fmt(min)} and ${fmt(max)}${unit ? ` ${unit}` : ''}`
  let s = z.number({ error: (iss) => (iss.input === undefined || iss.input === null ? `Enter ${label}` : `${cap(label)} must be a number`) })
  if (opts.int) s = s.int(`${cap(label)} must be a whole number`)
  return s.min(min, range).max(max, range)
}

/** A temperature field in the sender's unit; bounds are °C. */
function temp(label: string, boundsC: readonly [number, number], unit: TemperatureUnit) {
  const bounds: [number, number] = unit === 'F' ? [cToF(boundsC[0]), cToF(boundsC[1])] : [boundsC[0], boundsC[1]]
  return num(label, bounds, symbolOf(unit))
}

function revisionShape(unit: TemperatureUnit) {
  const L = SPEC_LIMITS
  return {
    refTempC: temp('the reference temperature', L.refTempC, unit),
    flashMinMinutes: num('the shortest flash between coats', L.flashMinutes, 'min'),
    flashMaxMinutes: num('the longest flash between coats', L.flashMinutes, 'min'),
    flashBeforeNextMinutes: num('the flash before the next product', L.flashBeforeNextMinutes, 'min'),
    recoatWindowMinutes: num('the recoat window', L.recoatWindowMinutes, 'min').nullish(),
    coats: num('the number of coats', L.coats, '', { int: true }),
    potLifeMinutes: num('the pot life', L.potLifeMinutes, 'min').nullish(),
    mixRatio: z
      .string({ error: 'The mix ratio is text such as 4:1:1' })
      .trim()
      .transform((v) => v.replace(/\s+/g, ''))
      .refine((v) => v === '' || MIX_RATIO.test(v), 'Write the mix ratio as parts by volume, e.g. 4:1 or 4:1:1')
      .nullish(),
    reducerBands: z
      .array(
        z.object({
          fromC: temp('the lower band edge', L.bandEdgeC, unit).nullish(),
          toC: temp('the upper band edge', L.bandEdgeC, unit).nullish(),
          grade: z.string({ error: 'Name the reducer grade' }).trim().min(1, 'Name the reducer grade').max(40, 'Use at most 40 characters'),
        }),
        { error: 'Reducer bands are a list' },
      )
      .max(L.maxReducerBands, `Use at most ${L.maxReducerBands} reducer bands`)
      .nullish(),
    minAirTempC: temp('the lowest application temperature', L.airTempC, unit).nullish(),
    maxAirTempC: temp('the highest application temperature', L.airTempC, unit).nullish(),
    minRhPct: num('the lowest application humidity', L.rhPct, '%').nullish(),
    maxRhPct: num('the highest application humidity', L.rhPct, '%').nullish(),
    dustFreeMinutes: num('the dust-free time', L.airDryMinutes, 'min').nullish(),
    handleMinutes: num('the time to handle', L.airDryMinutes, 'min').nullish(),
    sandPolishMinutes: num('the time to sand or polish', L.airDryMinutes, 'min').nullish(),
    bakeSchedules: z
      .array(
        z.object({
          objectTempC: temp('the bake object temperature', L.bakeObjectTempC, unit),
          minutes: num('the bake time', L.bakeMinutes, 'min'),
        }),
        { error: 'Bake schedules are a list' },
      )
      .max(L.maxBakeSchedules, `Use at most ${L.maxBakeSchedules} bake schedules`)
      .nullish(),
    minCureTempC: temp('the minimum cure temperature', L.minCureTempC, unit).nullish(),
    q10: num('Q10', L.q10, '').nullish(),
    flashTable: z
      .array(
        z.object({
          tempC: temp('the table temperature', L.tableTempC, unit),
          minutes: num('the table flash time', L.flashMinutes, 'min'),
        }),
        { error: 'The flash table is a list' },
      )
      .max(L.maxFlashTableRows, `Use at most ${L.maxFlashTableRows} rows`)
      .nullish(),
    wbRefRhPct: num('the reference humidity', L.wbRefRhPct, '%').nullish(),
    wbRefAirflowMps: num('the reference air velocity', L.wbRefAirflowMps, 'm/s').nullish(),
    wbAirflowExponent: num('the airflow exponent', L.wbAirflowExponent, '').nullish(),
  }
}

type RevisionRaw = z.output<z.ZodObject<ReturnType<typeof revisionShape>>>

export interface FieldIssue {
  path: string
  message: string
}

const present = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)

/**
 * Rules between fields of a complete revision (values in one unit, any: the checks only compare).
 * Returns issues with dotted paths, e.g. "reducerBands.1.fromC".
 */
export function crossFieldIssues(v: {
  [K in keyof SpecRevisionFields]?: SpecRevisionFields[K] | undefined | null
}): FieldIssue[] {
  const out: FieldIssue[] = []
  const add = (path: string, message: string) => out.push({ path, message })

  if (present(v.flashMinMinutes) && present(v.flashMaxMinutes) && v.flashMaxMinutes < v.flashMinMinutes) {
    add('flashMaxMinutes', 'The longest flash must not be shorter than the shortest')
  }
  if (present(v.recoatWindowMinutes)) {
    if (present(v.flashMaxMinutes) && v.recoatWindowMinutes < v.flashMaxMinutes) {
      add('recoatWindowMinutes', 'The recoat window must not end before the longest flash between coats')
    } else if (present(v.flashBeforeNextMinutes) && v.recoatWindowMinutes < v.flashBeforeNextMinutes) {
      add('recoatWindowMinutes', 'The recoat window must not end before the flash before the next product')
    }
  }

  // Reducer bands: from < to, open ends only at the coldest / warmest band, no overlap.
  const bands = (v.reducerBands ?? []).map((b, i) => ({ ...b, i, lo: present(b.fromC) ? b.fromC : -Infinity, hi: present(b.toC) ? b.toC : Infinity }))
  for (const b of bands) {
    if (b.lo === -Infinity && b.hi === Infinity && bands.length > 1) add(`reducerBands.${b.i}`, 'Give at least one edge: only a single band may cover every temperature')
    else if (!(b.lo < b.hi)) add(`reducerBands.${b.i}.toC`, 'The upper edge must be warmer than the lower edge')
  }
  const sorted = [...bands].sort((a, b) => a.lo - b.lo || a.hi - b.hi)
  for (let k = 1; k < sorted.length; k++) {
    const prev = sorted[k - 1]!
    const cur = sorted[k]!
    if (cur.lo < prev.hi) add(`reducerBands.${cur.i}.fromC`, `This band overlaps band ${prev.i + 1}; bands must not overlap`)
  }
  const grades = new Set<string>()
  for (const b of bands) {
    const g = String(b.grade ?? '').trim().toLowerCase()
    if (g && grades.has(g)) add(`reducerBands.${b.i}.grade`, 'This grade is already given for another band')
    grades.add(g)
  }

  if (present(v.minAirTempC) && present(v.maxAirTempC) && v.minAirTempC > v.maxAirTempC) {
    add('maxAirTempC', 'The highest application temperature must not be below the lowest')
  }
  if (present(v.minRhPct) && present(v.maxRhPct) && v.minRhPct > v.maxRhPct) {
    add('maxRhPct', 'The highest application humidity must not be below the lowest')
  }
  if (present(v.dustFreeMinutes) && present(v.handleMinutes) && v.handleMinutes < v.dustFreeMinutes) {
    add('handleMinutes', 'Handling comes after dust-free: this time must not be shorter')
  }
  const beforeSand = present(v.handleMinutes) ? v.handleMinutes : v.dustFreeMinutes
  if (present(beforeSand) && present(v.sandPolishMinutes) && v.sandPolishMinutes < beforeSand) {
    add('sandPolishMinutes', 'Sanding or polishing comes last: this time must not be shorter than the earlier ones')
  }

  // Cure schedule points (bakes, plus the air-dry time to sand / polish at the reference temperature):
  // different temperatures, and warmer never slower, or the activation energy comes out negative.
  const bakes = v.bakeSchedules ?? []
  const seen = new Map<number, number>()
  bakes.forEach((b, i) => {
    const prior = seen.get(b.objectTempC)
    if (prior !== undefined) add(`bakeSchedules.${i}.objectTempC`, `Bake ${prior + 1} already has this temperature`)
    else seen.set(b.objectTempC, i)
  })
  const points = bakes.map((b, i) => ({ t: b.objectTempC, m: b.minutes, path: `bakeSchedules.${i}.minutes` }))
  if (present(v.sandPolishMinutes) && present(v.refTempC) && !seen.has(v.refTempC)) {
    points.push({ t: v.refTempC, m: v.sandPolishMinutes, path: 'sandPolishMinutes' })
  }
  points.sort((a, b) => a.t - b.t)
  for (let k = 1; k < points.length; k++) {
    const cold = points[k - 1]!
    const warm = points[k]!
    if (warm.t > cold.t && warm.m > cold.m) {
      const path = warm.path === 'sandPolishMinutes' || cold.path === 'sandPolishMinutes' ? 'sandPolishMinutes' : warm.path
      add(path, path === 'sandPolishMinutes'
        ? 'The air-dry time to sand or polish does not fit the bake schedules: a warmer cure must not take longer'
        : 'A hotter bake must not take longer than a cooler one')
    }
  }
  if (bakes.length && !present(v.minCureTempC)) add('minCureTempC', 'Enter the minimum cure temperature: the bake schedules need it')
  if (present(v.minCureTempC) && bakes.some((b) => b.objectTempC < v.minCureTempC!)) {
    add('minCureTempC', 'The minimum cure temperature must not be above a bake temperature')
  }

  const table = v.flashTable ?? []
  if (v.flashTable && table.length < 2) add('flashTable', 'A flash table needs at least two temperatures (or none)')
  const rows = table.map((r, i) => ({ ...r, i })).sort((a, b) => a.tempC - b.tempC)
  for (let k = 1; k < rows.length; k++) {
    const cold = rows[k - 1]!
    const warm = rows[k]!
    if (warm.tempC === cold.tempC) add(`flashTable.${warm.i}.tempC`, `Row ${cold.i + 1} already has this temperature`)
    else if (warm.minutes > cold.minutes) add(`flashTable.${warm.i}.minutes`, 'A warmer row must not flash slower than a cooler one')
  }
  return out
}

/**
 * Rules that depend on the product: a 2K product needs pot life and mix ratio; a flash table is for
 * solvent-borne products, the waterborne references for waterborne ones.
 */
export function revisionContextIssues(product: ProductEngineFields, f: Partial<SpecRevisionFields>): FieldIssue[] {
  const out: FieldIssue[] = []
  if (product.components === 2) {
    if (!present(f.potLifeMinutes)) out.push({ path: 'potLifeMinutes', message: 'Enter the pot life: this is a 2K product' })
    if (!f.mixRatio) out.push({ path: 'mixRatio', message: 'Enter the mix ratio of this 2K product, e.g. 4:1:1' })
  }
  if (product.chemistry === 'waterborne' && f.flashTable && f.flashTable.length) {
    out.push({ path: 'flashTable', message: 'A flash table is for solvent-borne products: waterborne flash follows humidity and airflow' })
  }
  if (product.chemistry === 'solvent') {
    for (const k of ['wbRefRhPct', 'wbRefAirflowMps', 'wbAirflowExponent'] as const) {
      if (present(f[k])) out.push({ path: k, message: 'Only for waterborne products' })
    }
  }
  return out
}

// Rounded to a millionth of a degree so a bound typed in °F (e.g. −4 °F) lands exactly on its °C bound (−20 °C).
const toC = (v: number, unit: TemperatureUnit) => (unit === 'F' ? Math.round(fToC(v) * 1e6) / 1e6 : v)
const toCOrNull = (v: number | null | undefined, unit: TemperatureUnit) => (present(v) ? toC(v, unit) : null)

type RawBand = NonNullable<RevisionRaw['reducerBands']>[number]

function bandsToSI(bands: RawBand[], unit: TemperatureUnit): ReducerBandInput[] {
  return bands.map((b) => ({ fromC: toCOrNull(b.fromC, unit), toC: toCOrNull(b.toC, unit), grade: b.grade }))
}

/** Converts the fields present in a raw (unit) revision to SI; missing optional values become null. */
function partialToSI(v: Partial<RevisionRaw>, unit: TemperatureUnit): Partial<SpecRevisionFields> {
  const out: Partial<SpecRevisionFields> = {}
  const has = (k: keyof RevisionRaw) => Object.prototype.hasOwnProperty.call(v, k) && v[k] !== undefined
  const nullable = (x: number | null | undefined) => (present(x) ? x : null)
  if (has('refTempC')) out.refTempC = toC(v.refTempC!, unit)
  if (has('flashMinMinutes')) out.flashMinMinutes = v.flashMinMinutes!
  if (has('flashMaxMinutes')) out.flashMaxMinutes = v.flashMaxMinutes!
  if (has('flashBeforeNextMinutes')) out.flashBeforeNextMinutes = v.flashBeforeNextMinutes!
  if (has('recoatWindowMinutes')) out.recoatWindowMinutes = nullable(v.recoatWindowMinutes)
  if (has('coats')) out.coats = v.coats!
  if (has('potLifeMinutes')) out.potLifeMinutes = nullable(v.potLifeMinutes)
  if (has('mixRatio')) out.mixRatio = v.mixRatio ? v.mixRatio : null
  if (has('reducerBands')) out.reducerBands = bandsToSI(v.reducerBands ?? [], unit)
  if (has('minAirTempC')) out.minAirTempC = toCOrNull(v.minAirTempC, unit)
  if (has('maxAirTempC')) out.maxAirTempC = toCOrNull(v.maxAirTempC, unit)
  if (has('minRhPct')) out.minRhPct = nullable(v.minRhPct)
  if (has('maxRhPct')) out.maxRhPct = nullable(v.maxRhPct)
  if (has('dustFreeMinutes')) out.dustFreeMinutes = nullable(v.dustFreeMinutes)
  if (has('handleMinutes')) out.handleMinutes = nullable(v.handleMinutes)
  if (has('sandPolishMinutes')) out.sandPolishMinutes = nullable(v.sandPolishMinutes)
  if (has('bakeSchedules')) out.bakeSchedules = (v.bakeSchedules ?? []).map((b) => ({ objectTempC: toC(b.objectTempC, unit), minutes: b.minutes }))
  if (has('minCureTempC')) out.minCureTempC = toCOrNull(v.minCureTempC, unit)
  if (has('q10')) out.q10 = present(v.q10) ? v.q10 : DEFAULT_Q10
  if (has('flashTable')) out.flashTable = v.flashTable && v.flashTable.length ? v.flashTable.map((r) => ({ tempC: toC(r.tempC, unit), minutes: r.minutes })) : null
  if (has('wbRefRhPct')) out.wbRefRhPct = nullable(v.wbRefRhPct)
  if (has('wbRefAirflowMps')) out.wbRefAirflowMps = nullable(v.wbRefAirflowMps)
  if (has('wbAirflowExponent')) out.wbAirflowExponent = nullable(v.wbAirflowExponent)
  return out
}

export const DEFAULT_Q10 = 2

/** A complete revision with every optional field filled in (null / [] / Q10 2). */
export function completeRevision(p: Partial<SpecRevisionFields> & Pick<SpecRevisionFields, 'refTempC' | 'flashMinMinutes' | 'flashMaxMinutes' | 'flashBeforeNextMinutes' | 'coats'>): SpecRevisionFields {
  return {
    recoatWindowMinutes: null,
    potLifeMinutes: null,
    mixRatio: null,
    reducerBands: [],
    minAirTempC: null,
    maxAirTempC: null,
    minRhPct: null,
    maxRhPct: null,
    dustFreeMinutes: null,
    handleMinutes: null,
    sandPolishMinutes: null,
    bakeSchedules: [],
    minCureTempC: null,
    q10: DEFAULT_Q10,
    flashTable: null,
    wbRefRhPct: null,
    wbRefAirflowMps: null,
    wbAirflowExponent: null,
    ...p,
  }
}

function fullSchema(unit: TemperatureUnit) {
  // The rules between fields run only once every field is valid on its own (a pipe stops at the first
  // stage's issues), so one wrong value gives one message.
  return z
    .object(revisionShape(unit))
    .pipe(
      z.custom<RevisionRaw>().superRefine((v, ctx) => {
        for (const i of crossFieldIssues(v as Parameters<typeof crossFieldIssues>[0])) {
          ctx.addIssue({ code: 'custom', message: i.message, path: i.path.split('.').map((p) => (/^\d+$/.test(p) ? Number(p) : p)) })
        }
      }),
    )
    .transform((v): SpecRevisionFields => {
      const f = partialToSI(v, unit)
      return completeRevision({
        ...f,
        refTempC: f.refTempC!,
        flashMinMinutes: f.flashMinMinutes!,
        flashMaxMinutes: f.flashMaxMinutes!,
        flashBeforeNextMinutes: f.flashBeforeNextMinutes!,
        coats: f.coats!,
      })
    })
}

function patchSchema(unit: TemperatureUnit) {
  return z
    .object(revisionShape(unit))
    .partial()
    .transform((v) => partialToSI(v, unit))
    .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change' })
}

const FULL = { C: fullSchema('C'), F: fullSchema('F') }
const PATCH = { C: patchSchema('C'), F: patchSchema('F') }

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x)
}

/** Reads `unit` ('C' default, or 'F') and validates the rest with the schema for that unit. */
function withUnit<T>(pick: (u: TemperatureUnit) => z.ZodType<T>) {
  return z.unknown().transform((value, ctx): T => {
    if (!isRecord(value)) {
      ctx.addIssue({ code: 'custom', message: 'Send the revision as an object of fields' })
      return z.NEVER
    }
    const { unit = 'C', ...rest } = value
    if (unit !== 'C' && unit !== 'F') {
      ctx.addIssue({ code: 'custom', message: "The unit is 'C' or 'F'", path: ['unit'] })
      return z.NEVER
    }
    const r = pick(unit).safeParse(rest)
    if (!r.success) {
      for (const i of r.error.issues) ctx.addIssue({ code: 'custom', message: i.message, path: i.path })
      return z.NEVER
    }
    return r.data
  })
}

/** A complete revision, `{ unit?: 'C' | 'F', ...fields }` → SI fields. */
export const SpecRevisionInputSchema = withUnit<SpecRevisionFields>((u) => FULL[u])
/** Some fields of a revision (absent = unchanged, null = cleared), `{ unit?, ... }` → SI. */
export const SpecRevisionPatchSchema = withUnit<Partial<SpecRevisionFields>>((u) => PATCH[u])

/** Validates a complete SI revision (after a patch is merged): the schema rules in °C. */
export function revisionIssuesSI(f: SpecRevisionFields): FieldIssue[] {
  const r = FULL.C.safeParse(f)
  return r.success ? [] : r.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }))
}

// ── preview ─────────────────────────────────────────────────────────────────────────────────────

export const PreviewConditionsShape = {
  airTempC: z.number({ error: 'Enter the air temperature' }).min(-20, 'Air temperature must be between −20 and 60 °C').max(60, 'Air temperature must be between −20 and 60 °C'),
  rhPct: z.number({ error: 'Enter the relative humidity' }).min(0, 'Humidity must be between 0 and 100 %').max(100, 'Humidity must be between 0 and 100 %'),
  airflowMps: z.number().min(0, 'Air velocity must be between 0 and 5 m/s').max(5, 'Air velocity must be between 0 and 5 m/s').nullish(),
  panelTempC: z.number().min(-20, 'Panel temperature must be between −20 and 200 °C').max(200, 'Panel temperature must be between −20 and 200 °C').nullish(),
}

export const SpecPreviewSchema = z
  .object({
    revisionId: z.number().int().positive().optional(),
    product: z.object({ chemistry: ChemistryField, components: ComponentsField }).optional(),
    revision: SpecRevisionInputSchema.optional(),
    ...PreviewConditionsShape,
  })
  .superRefine((v, ctx) => {
    if (v.revisionId === undefined && (!v.product || !v.revision)) {
      ctx.addIssue({ code: 'custom', message: 'Send a revisionId, or a product (chemistry, components) with revision fields', path: ['revisionId'] })
    }
  })
export type SpecPreviewInput = z.output<typeof SpecPreviewSchema>
