// The revision edit form's state and its mapping to the API body. Pure, shared by the page and tests.
// The form holds temperatures in the unit chosen on the form ('C' or 'F') and sends them with `unit`;
// the server (the same schema) converts °F to °C.
import {
  revisionContextIssues,
  SpecRevisionInputSchema,
  type FieldIssue,
  type ProductEngineFields,
  type SpecRevisionFields,
  type TemperatureUnit,
} from '../schemas/spec'
import { convertTemperatures } from './units'

type N = number | null

export interface RevisionFormState {
  refTempC: N
  flashMinMinutes: N
  flashMaxMinutes: N
  flashBeforeNextMinutes: N
  recoatWindowMinutes: N
  coats: N
  potLifeMinutes: N
  mixRatio: string
  reducerBands: { fromC: N; toC: N; grade: string }[]
  minAirTempC: N
  maxAirTempC: N
  minRhPct: N
  maxRhPct: N
  dustFreeMinutes: N
  handleMinutes: N
  sandPolishMinutes: N
  bakeSchedules: { objectTempC: N; minutes: N }[]
  minCureTempC: N
  q10: N
  flashTable: { tempC: N; minutes: N }[]
  wbRefRhPct: N
  wbRefAirflowMps: N
  wbAirflowExponent: N
}

/** A new revision's starting values in °C (20 °C reference, Q10 2; waterborne references prefilled). */
export function emptyFormState(product: ProductEngineFields): RevisionFormState {
  const wb = product.chemistry === 'waterborne'
  return {
    refTempC: 20,
    flashMinMinutes: null,
    flashMaxMinutes: null,
    flashBeforeNextMinutes: null,
    recoatWindowMinutes: null,
    coats: 2,
    potLifeMinutes: null,
    mixRatio: '',
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
    q10: 2,
    flashTable: [],
    wbRefRhPct: wb ? 50 : null,
    wbRefAirflowMps: wb ? 0.3 : null,
    wbAirflowExponent: wb ? 0.5 : null,
  }
}

const clone = <T>(v: T): T => JSON.parse(JSON.stringify(v)) as T

/** The form state of a stored (SI) revision, temperatures in `unit` (2 decimals). */
export function formStateFromRevision(r: SpecRevisionFields, unit: TemperatureUnit): RevisionFormState {
  const s: RevisionFormState = {
    refTempC: r.refTempC,
    flashMinMinutes: r.flashMinMinutes,
    flashMaxMinutes: r.flashMaxMinutes,
    flashBeforeNextMinutes: r.flashBeforeNextMinutes,
    recoatWindowMinutes: r.recoatWindowMinutes,
    coats: r.coats,
    potLifeMinutes: r.potLifeMinutes,
    mixRatio: r.mixRatio ?? '',
    reducerBands: clone(r.reducerBands),
    minAirTempC: r.minAirTempC,
    maxAirTempC: r.maxAirTempC,
    minRhPct: r.minRhPct,
    maxRhPct: r.maxRhPct,
    dustFreeMinutes: r.dustFreeMinutes,
    handleMinutes: r.handleMinutes,
    sandPolishMinutes: r.sandPolishMinutes,
    bakeSchedules: clone(r.bakeSchedules),
    minCureTempC: r.minCureTempC,
    q10: r.q10,
    flashTable: clone(r.flashTable ?? []),
    wbRefRhPct: r.wbRefRhPct,
    wbRefAirflowMps: r.wbRefAirflowMps,
    wbAirflowExponent: r.wbAirflowExponent,
  }
  return convertTemperatures(s, 'C', unit, 2)
}

/** The form state with its temperatures in another unit (2 decimals). */
export function switchFormUnit(s: RevisionFormState, from: TemperatureUnit, to: TemperatureUnit): RevisionFormState {
  return convertTemperatures(clone(s), from, to, 2)
}

/**
 * The API body of the form: `unit` plus every field; empty lists become [] / null; the flash table and the
 * waterborne references are only sent for the chemistry they belong to.
 */
export function formPayload(s: RevisionFormState, unit: TemperatureUnit, product: ProductEngineFields): Record<string, unknown> {
  const wb = product.chemistry === 'waterborne'
  return {
    unit,
    ...s,
    mixRatio: s.mixRatio.trim() || null,
    flashTable: !wb && s.flashTable.length ? s.flashTable : null,
    wbRefRhPct: wb ? s.wbRefRhPct : null,
    wbRefAirflowMps: wb ? s.wbRefAirflowMps : null,
    wbAirflowExponent: wb ? s.wbAirflowExponent : null,
  }
}

export interface FormCheck {
  ok: boolean
  /** Field path → first message. */
  errors: Record<string, string>
  /** The SI fields when ok. */
  fields: SpecRevisionFields | null
}

/** Runs the same rules as the server: the schema, then the product's rules. */
export function checkForm(s: RevisionFormState, unit: TemperatureUnit, product: ProductEngineFields): FormCheck {
  const r = SpecRevisionInputSchema.safeParse(formPayload(s, unit, product))
  let issues: FieldIssue[]
  let fields: SpecRevisionFields | null = null
  if (r.success) {
    fields = r.data
    issues = revisionContextIssues(product, r.data)
  } else {
    issues = r.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }))
  }
  const errors: Record<string, string> = {}
  for (const i of issues) errors[i.path || '_'] ??= i.message
  return { ok: issues.length === 0, errors, fields: issues.length === 0 ? fields : null }
}
