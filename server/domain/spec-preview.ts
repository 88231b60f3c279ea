import type { Kysely } from 'kysely'
import {
  applicationWindowCheck,
  condensationGuard,
  cureCredit,
  flashProgress,
  potLife,
  reducerAdvice,
  type ApplicationProblem,
  type EstimateReason,
  type Sample,
} from '#shared/cure'
import { revisionContextIssues, type ProductEngineFields, type SpecPreviewInput, type SpecRevisionFields } from '#shared/schemas/spec'
import {
  activationEnergyOf,
  applicationLimits,
  reducerBands,
  toAirDrySpec,
  toCureSpecs,
  toFlashSpec,
  toPotLifeSpec,
} from '#shared/specs/engine-inputs'
import type { Database } from '../db/database'
import { findRevisionWithProduct } from '../repositories/specs'
import { SpecError } from './specs'

// What a spec revision means at CONSTANT conditions the user types: the cure engine run on a
// two-reading constant series (the same functions the live countdowns use on real readings).

export interface PreviewConditions {
  airTempC: number
  rhPct: number
  airflowMps?: number | null
  panelTempC?: number | null
}

export interface TimeAtConditions {
  /** Minutes at the typed conditions; null when no progress happens (e.g. below the minimum cure temperature, 100 % RH). */
  minutes: number | null
  /** Minutes of the TDS at its reference conditions. */
  refMinutes: number
}

export interface CurePreview {
  objectTempC: number
  requiredMinutes: number
  /** Temperature the credit is counted on: the panel when typed, else the air. */
  atTempC: number
  /** Equivalent minutes at the schedule temperature earned by `requiredMinutes` at atTempC. */
  creditMinutes: number | null
  /** creditMinutes / requiredMinutes. */
  creditFraction: number | null
  /** Time at atTempC for the full schedule; null below the minimum cure temperature. */
  minutesToComplete: number | null
}

export interface SpecPreview {
  conditions: {
    airTempC: number
    rhPct: number
    airflowMps: number | null
    panelTempC: number | null
    cureTempC: number
    dewPointC: number | null
  }
  flash: {
    betweenCoats: { min: TimeAtConditions; max: TimeAtConditions }
    beforeNext: TimeAtConditions
    recoatWindow: TimeAtConditions | null
    /** Drying-rate multiplier at the conditions (1 = the TDS reference). */
    rate: number | null
    airflowAssumed: boolean
    reasons: EstimateReason[]
  }
  potLife: TimeAtConditions | null
  airDry: { dustFree: TimeAtConditions | null; handle: TimeAtConditions | null; sandPolish: TimeAtConditions | null }
  cure: { eaJPerMol: number; eaSource: 'schedule' | 'q10'; panelAssumed: boolean; schedules: CurePreview[] }
  reducer: { bands: number; advised: string | null }
  application: { ok: boolean; problems: ApplicationProblem[] }
  condensation: { ok: boolean; marginC: number | null; dewPointC: number | null }
  summary: string[]
}

const T0 = Date.UTC(2026, 0, 1, 12, 0, 0)
const MIN = 60_000
const HOLD = { maxHoldMs: Number.POSITIVE_INFINITY }
const finite = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)
const minutesFrom = (atMs: number | null) => (atMs === null || !Number.isFinite(atMs) ? null : (atMs - T0) / MIN)

/** Two readings of the same values, `spanMinutes` apart: a constant series for the engine. */
function constantSeries(c: PreviewConditions, spanMinutes: number, withPanel: boolean): Sample[] {
  const s: Omit<Sample, 't'> = { airTempC: c.airTempC, rhPct: c.rhPct }
  if (finite(c.airflowMps)) s.airflowMps = c.airflowMps
  if (withPanel && finite(c.panelTempC)) s.panelTempC = c.panelTempC
  return [
    { t: T0, ...s },
    { t: T0 + spanMinutes * MIN, ...s },
  ]
}

function flashAt(product: ProductEngineFields, revision: SpecRevisionFields, c: PreviewConditions, stage: 'between-coats' | 'before-next') {
  const spec = toFlashSpec(product, revision, stage)
  const r = flashProgress(spec, constantSeries(c, 1, false), T0, T0 + MIN, HOLD)
  return { spec, r }
}

function curePreview(c: PreviewConditions, cureTempC: number, spec: ReturnType<typeof toCureSpecs>[number]): CurePreview {
  const samples = constantSeries(c, spec.requiredMinutes, true)
  const r = cureCredit(spec, samples, T0, T0 + spec.requiredMinutes * MIN, HOLD)
  const credit = finite(r.equivalentMinutes) ? r.equivalentMinutes : null
  return {
    objectTempC: spec.specTempC,
    requiredMinutes: spec.requiredMinutes,
    atTempC: cureTempC,
    creditMinutes: credit,
    creditFraction: credit === null ? null : credit / spec.requiredMinutes,
    minutesToComplete: minutesFrom(r.completeAtMs),
  }
}

function airDryAt(revision: SpecRevisionFields, c: PreviewConditions, minutes: number | null): TimeAtConditions | null {
  const spec = toAirDrySpec(revision, minutes)
  if (!spec) return null
  const r = cureCredit(spec, constantSeries(c, 1, true), T0, T0 + MIN, HOLD)
  return { minutes: minutesFrom(r.completeAtMs), refMinutes: spec.requiredMinutes }
}

/** Runs the engine on a revision at constant conditions. Pure. */
export function previewRevision(product: ProductEngineFields, revision: SpecRevisionFields, c: PreviewConditions): SpecPreview {
  const cureTempC = finite(c.panelTempC) ? c.panelTempC : c.airTempC

  const between = flashAt(product, revision, c, 'between-coats')
  const next = flashAt(product, revision, c, 'before-next')
  const rate = finite(between.r.rateNow) ? between.r.rateNow : null
  const recoatEnd = between.spec.recoatWindowMinutes
  const flash: SpecPreview['flash'] = {
    betweenCoats: {
      min: { minutes: minutesFrom(between.r.readyAtMs), refMinutes: revision.flashMinMinutes },
      max: { minutes: minutesFrom(between.r.readyByMs), refMinutes: revision.flashMaxMinutes },
    },
    beforeNext: { minutes: minutesFrom(next.r.readyAtMs), refMinutes: revision.flashBeforeNextMinutes },
    recoatWindow: recoatEnd === undefined ? null : { minutes: minutesFrom(between.r.recoatWindowEndsAtMs), refMinutes: recoatEnd },
    rate,
    airflowAssumed: between.r.airflowAssumed,
    reasons: between.r.reasons,
  }

  const potSpec = toPotLifeSpec(product, revision)
  let pot: TimeAtConditions | null = null
  if (potSpec) {
    const r = potLife(potSpec, constantSeries(c, 1, false), T0, T0 + MIN, HOLD)
    pot = { minutes: minutesFrom(r.expiresAtMs), refMinutes: potSpec.potLifeMinutes }
  }

  const ea = activationEnergyOf(revision)
  const schedules = toCureSpecs(product, revision).map((s) => curePreview(c, cureTempC, s))
  const airDry = {
    dustFree: airDryAt(revision, c, revision.dustFreeMinutes),
    handle: airDryAt(revision, c, revision.handleMinutes),
    sandPolish: airDryAt(revision, c, revision.sandPolishMinutes),
  }

  const bands = reducerBands(revision)
  const advised = bands.length ? reducerAdvice(bands, c.airTempC) : null
  const app = applicationWindowCheck(applicationLimits(revision), { airTempC: c.airTempC, panelTempC: c.panelTempC ?? null, rhPct: c.rhPct })
  const cond = condensationGuard(cureTempC, c.airTempC, c.rhPct)

  const preview: SpecPreview = {
    conditions: {
      airTempC: c.airTempC,
      rhPct: c.rhPct,
      airflowMps: finite(c.airflowMps) ? c.airflowMps : null,
      panelTempC: finite(c.panelTempC) ? c.panelTempC : null,
      cureTempC,
      dewPointC: finite(cond.dewPointC) ? cond.dewPointC : null,
    },
    flash,
    potLife: pot,
    airDry,
    cure: { eaJPerMol: ea.eaJPerMol, eaSource: ea.source, panelAssumed: !finite(c.panelTempC), schedules },
    reducer: { bands: bands.length, advised },
    application: { ok: app.ok, problems: app.problems },
    condensation: { ok: cond.ok, marginC: finite(cond.marginC) ? cond.marginC : null, dewPointC: finite(cond.dewPointC) ? cond.dewPointC : null },
    summary: [],
  }
  preview.summary = summarise(product, revision, preview)
  return preview
}

// ── words (°C; the page words its own in the user's units) ─────────────────────────────────────

const r1 = (v: number) => String(Math.round(v * 10) / 10)
export function formatMinutes(m: number | null): string {
  if (m === null || !Number.isFinite(m)) return 'no end at these conditions'
  if (m < 10) return `${r1(m)} min`
  if (m < 90) return `${Math.round(m)} min`
  const total = Math.round(m)
  const h = Math.floor(total / 60)
  const rest = total % 60
  return rest ? `${h} h ${rest} min` : `${h} h`
}

const CHANNEL_WORDS: Record<ApplicationProblem['channel'], string> = { airTempC: 'air temperature', panelTempC: 'panel temperature', rhPct: 'humidity' }

function summarise(product: ProductEngineFields, revision: SpecRevisionFields, p: SpecPreview): string[] {
  const out: string[] = []
  const c = p.conditions
  const air = c.airflowMps !== null ? `, air ${r1(c.airflowMps)} m/s` : ''
  const f = p.flash
  out.push(
    `At ${r1(c.airTempC)} °C and ${r1(c.rhPct)} % RH${air} the flash between coats takes about ${formatMinutes(f.betweenCoats.min.minutes)} to ${formatMinutes(f.betweenCoats.max.minutes)} ` +
      `(data sheet: ${formatMinutes(revision.flashMinMinutes)} to ${formatMinutes(revision.flashMaxMinutes)} at ${r1(revision.refTempC)} °C); ` +
      `before the next product about ${formatMinutes(f.beforeNext.minutes)}.`,
  )
  if (product.chemistry === 'waterborne' && f.airflowAssumed) out.push('No air velocity given: the reference air velocity of the data sheet is assumed.')
  if (f.recoatWindow) out.push(`The recoat window closes after about ${formatMinutes(f.recoatWindow.minutes)}.`)
  if (p.potLife) out.push(`Pot life about ${formatMinutes(p.potLife.minutes)} (data sheet: ${formatMinutes(p.potLife.refMinutes)}).`)
  const on = c.panelTempC !== null ? 'panel' : 'air (panel assumed equal)'
  for (const s of p.cure.schedules) {
    if (s.minutesToComplete === null || s.creditFraction === null) {
      out.push(`Bake ${formatMinutes(s.requiredMinutes)} at ${r1(s.objectTempC)} °C: at ${r1(s.atTempC)} °C ${on} the panel is below the minimum cure temperature, so no cure credit.`)
    } else {
      out.push(
        `Bake ${formatMinutes(s.requiredMinutes)} at ${r1(s.objectTempC)} °C: the same time at ${r1(s.atTempC)} °C ${on} gives ${Math.round(s.creditFraction * 100)} % of its cure credit; ` +
          `the full cure takes about ${formatMinutes(s.minutesToComplete)}.`,
      )
    }
  }
  if (p.airDry.sandPolish) out.push(`Air-dry to sand or polish about ${formatMinutes(p.airDry.sandPolish.minutes)} (data sheet: ${formatMinutes(p.airDry.sandPolish.refMinutes)}).`)
  if (p.reducer.bands) {
    out.push(p.reducer.advised ? `Advised reducer: ${p.reducer.advised}.` : `No reducer band of the data sheet covers ${r1(c.airTempC)} °C.`)
  }
  for (const prob of p.application.problems) {
    if (prob.kind === 'missing') continue
    out.push(`Outside the application limits: ${CHANNEL_WORDS[prob.channel]} ${prob.kind} ${r1(prob.limit)}${prob.channel === 'rhPct' ? ' %' : ' °C'}.`)
  }
  if (!p.condensation.ok && p.condensation.marginC !== null && p.condensation.dewPointC !== null) {
    out.push(`Dew point ${r1(p.condensation.dewPointC)} °C: the surface is only ${r1(p.condensation.marginC)} °C above it (keep at least 3 °C).`)
  }
  return out
}

/** The preview for a request: a stored revision (revisionId) or fields sent with their product. */
export async function previewForRequest(db: Kysely<Database>, input: SpecPreviewInput): Promise<SpecPreview & { revisionId: number | null }> {
  const conditions: PreviewConditions = { airTempC: input.airTempC, rhPct: input.rhPct, airflowMps: input.airflowMps, panelTempC: input.panelTempC }
  if (input.revisionId !== undefined) {
    const found = await findRevisionWithProduct(db, input.revisionId)
    if (!found) throw new SpecError(404, 'No such spec revision')
    return { ...previewRevision(found.product, found.revision, conditions), revisionId: found.revision.id }
  }
  const product = input.product!
  const revision = input.revision!
  const issues = revisionContextIssues(product, revision).map((i) => ({ ...i, path: `revision.${i.path}` }))
  if (issues.length) throw new SpecError(400, 'Some fields need attention', issues)
  return { ...previewRevision(product, revision, conditions), revisionId: null }
}
