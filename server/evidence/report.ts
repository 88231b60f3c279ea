import type { Kysely } from 'kysely'
import { flashProgress, type Sample } from '#shared/cure'
import { toFlashSpec } from '#shared/specs/engine-inputs'
import { CALIBRATED_CHANNELS, CHANNEL_INFO } from '#shared/bake/channels'
import type { Database, User } from '../db/database'
import type { Coat, Job, JobStep } from '../db/tables/jobs'
import { listBooths, type BoothRow } from '../repositories/booths'
import { listCoatsOfJob } from '../repositories/coats'
import { findJob, listStepsOfJobs } from '../repositories/jobs'
import { listCalibrations } from '../repositories/calibrations'
import { rawSeries } from '../repositories/readings'
import { listUsers } from '../repositories/users'
import {
  alertsOfPeriod,
  bakeIdsOfJob,
  bakeIdsOfPeriod,
  coatsOfBoothInPeriod,
  coatsOfJobs,
  countReadings,
  jobClosings,
  jobsByIds,
  minuteGaps,
  revisionsWithTds,
} from '../repositories/exports'
import { getBake } from '../domain/bakes'
import { calibrateSeriesPoints } from '../domain/calibration'
import { planComplete } from '../domain/coats'
import { chainHead, verifyChain } from '../domain/event-log'
import { boothHistory } from '../domain/history'
import { loadRevisions, revisionLabel, type RevisionInfo } from '../domain/jobs'
import { conditionStats, MIN_GAP_MINUTES, readingCoverage, thin, wholeMinutes, type EnvPoint } from './coverage'
import type {
  AlertEvidence,
  BakeEvidence,
  CalibrationEvidence,
  ChainEvidence,
  ChartSpec,
  CoatEvidence,
  EvidenceReport,
  EvidenceScope,
  RevisionEvidence,
  SectionNote,
  SignOffEvidence,
} from './types'
import { coatVerdict, num1 } from './verdict'

// Gathers everything an evidence pack states, for a job or for a booth and a period, into the plain
// EvidenceReport model (rendered by pdf.ts, summarised by manifest.ts). Reads only.

type Db = Kysely<Database>
export type Who = { id: number; name: string; role: string }

export class EvidenceError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

/** Conditions before the first coat are part of the record (the booth at the start of the job). */
export const PERIOD_LEAD_MS = 15 * 60_000
/** After the last coat with no bake: its flash and the first part of the air-dry. */
export const PERIOD_TAIL_MS = 60 * 60_000
/** A booth pack covers at most this much (a quarter); longer reviews take several packs. */
export const MAX_BOOTH_PERIOD_DAYS = 93
/** A coat's flash is looked at for at most this long (a next coat the next morning still gets judged). */
const MAX_FLASH_WINDOW_MS = 24 * 3_600_000
const HOLD_MS = 120_000

export interface ResolvedScope {
  kind: 'job' | 'booth'
  job: Job | null
  booths: BoothRow[]
  from: Date
  to: Date
  title: string
  /** For file names: "RO-1001" or "downdraft-1_2026-11-01_2026-11-30". */
  stem: string
}

const day = (d: Date) => d.toISOString().slice(0, 10)
const safeStem = (s: string) => s.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80) || 'export'

/** Which booths and which period a pack covers; 404 for an unknown job or booth, 400 for a bad period. */
export async function resolveScope(db: Db, scope: EvidenceScope, nowMs = Date.now()): Promise<ResolvedScope> {
  const booths = await listBooths(db)
  if (scope.kind === 'booth') {
    const booth = booths.find((b) => b.id === scope.boothId)
    if (!booth) throw new EvidenceError(404, 'No such booth')
    const to = new Date(Math.min(scope.to.getTime(), nowMs))
    if (!(to.getTime() > scope.from.getTime())) throw new EvidenceError(400, 'The period must end after it starts, and start in the past')
    if (to.getTime() - scope.from.getTime() > MAX_BOOTH_PERIOD_DAYS * 86_400_000) {
      throw new EvidenceError(400, `A pack covers at most ${MAX_BOOTH_PERIOD_DAYS} days; split the period`)
    }
    return {
      kind: 'booth',
      job: null,
      booths: [booth],
      from: scope.from,
      to,
      title: `${booth.name}, ${day(scope.from)} to ${day(to)}`,
      stem: safeStem(`${booth.slug}_${day(scope.from)}_${day(to)}`),
    }
  }
  const job = await findJob(db, scope.jobId)
  if (!job) throw new EvidenceError(404, 'No such job')
  const coats = await listCoatsOfJob(db, job.id)
  const boothIds = new Set(coats.map((c) => c.booth_id))
  if (!boothIds.size && job.booth_id) boothIds.add(job.booth_id)
  let from: number
  let to: number
  if (coats.length) {
    from = Math.min(...coats.map((c) => c.started_at.getTime())) - PERIOD_LEAD_MS
    to = Math.max(...coats.map((c) => (c.finished_at ?? c.started_at).getTime())) + PERIOD_TAIL_MS
    for (const id of await bakeIdsOfJob(db, job.id)) {
      const b = await getBake(db, id, nowMs).catch(() => null)
      if (!b) continue
      from = Math.min(from, Date.parse(b.bake.startedAt))
      to = Math.max(to, (b.bake.endedAt ? Date.parse(b.bake.endedAt) : nowMs) + PERIOD_LEAD_MS)
    }
  } else {
    from = job.created_at.getTime()
    to = Math.max(from + 1000, job.updated_at.getTime())
  }
  to = Math.max(from + 1000, Math.min(to, nowMs))
  return {
    kind: 'job',
    job,
    booths: booths.filter((b) => boothIds.has(b.id)),
    from: new Date(from),
    to: new Date(to),
    title: `Repair order ${job.number} — ${job.vehicle}`,
    stem: safeStem(job.number),
  }
}

// ── sections ───────────────────────────────────────────────────────────────────────────────────────

/** Runs a section's reads; a table this database does not have yet (42P01) becomes a note, not a failure. */
async function safely<T>(notes: SectionNote[], section: string, fallback: T, read: () => Promise<T>): Promise<T> {
  try {
    return await read()
  } catch (e) {
    if ((e as { code?: string }).code === '42P01') {
      notes.push({ section, note: 'this part of Boothbeat is not set up in this database yet' })
      return fallback
    }
    throw e
  }
}

const toEnv = (p: { t: Date; values: Record<string, number | null> }): EnvPoint => ({
  t: p.t.getTime(),
  airTempC: p.values.air_temp_c ?? null,
  rhPct: p.values.rh_pct ?? null,
  panelTempC: p.values.panel_temp_c ?? null,
  airflowMps: p.values.airflow_mps ?? null,
  dewPointC: p.values.dew_point_c ?? null,
})

/** Calibrated readings of a booth over [fromMs − hold, toMs]. */
async function envPoints(db: Db, boothId: number, fromMs: number, toMs: number): Promise<EnvPoint[]> {
  const raw = await rawSeries(db, boothId, new Date(fromMs - HOLD_MS), new Date(toMs + 1))
  return (await calibrateSeriesPoints(db, boothId, raw)).map(toEnv)
}

const byStart = (a: Coat, b: Coat) => a.started_at.getTime() - b.started_at.getTime() || a.id - b.id
const r1 = (v: number) => Math.round(v * 10) / 10

async function coatEvidence(
  db: Db,
  coat: Coat,
  jobCoats: Coat[],
  job: Job,
  steps: JobStep[],
  revs: Map<number, RevisionInfo>,
  users: Map<number, User>,
  boothName: string,
  nowMs: number,
): Promise<CoatEvidence> {
  const ordered = [...jobCoats].sort(byStart)
  const next = ordered[ordered.findIndex((c) => c.id === coat.id) + 1] ?? null
  const step = steps.find((s) => s.id === coat.step_id) ?? null
  const rev = step ? revs.get(step.revision_id) : undefined
  const start = coat.started_at.getTime()
  const finish = coat.finished_at?.getTime() ?? null
  const flashEnd = finish !== null && next ? Math.min(next.started_at.getTime(), finish + MAX_FLASH_WINDOW_MS) : null
  const points = await envPoints(db, coat.booth_id, start, flashEnd ?? finish ?? Math.min(nowMs, start + MAX_FLASH_WINDOW_MS))
  const during = conditionStats(points, start, finish ?? nowMs)

  let flash: CoatEvidence['flash'] = null
  let progress: number | null = null
  let recoatPassed = false
  let uncertain = false
  let reasons: string[] = []
  if (finish !== null && next && flashEnd !== null && rev) {
    const stage = next.step_id === coat.step_id ? 'between-coats' : 'before-next'
    const spec = toFlashSpec(rev.product, rev.fields, stage)
    const samples: Sample[] = points.map((p) => ({ t: p.t, airTempC: p.airTempC, rhPct: p.rhPct, panelTempC: p.panelTempC, airflowMps: p.airflowMps }))
    const nextStart = next.started_at.getTime()
    const result = flashProgress(spec, samples, finish, Math.max(finish, nextStart))
    progress = Number.isFinite(result.progress) ? result.progress : null
    recoatPassed = spec.recoatWindowMinutes !== undefined && result.recoatWindowPassed
    uncertain = result.uncertain
    reasons = result.reasons
    const recorded = next.start_check?.flash
    flash = {
      kind: stage === 'between-coats' ? 'between_coats' : 'next_product',
      nextCoatId: next.id,
      from: new Date(finish).toISOString(),
      to: new Date(flashEnd).toISOString(),
      stats: conditionStats(points, finish, flashEnd),
      specMinMinutes: spec.flashMinMinutes,
      specMaxMinutes: spec.flashMaxMinutes,
      refTempC: spec.refTempC ?? 20,
      requiredMinutes: result.readyAtMs === null ? null : r1((result.readyAtMs - finish) / 60_000),
      waitedMinutes: r1((nextStart - finish) / 60_000),
      progress: progress === null ? null : Math.round(progress * 1000) / 1000,
      recoatWindowMinutes: spec.recoatWindowMinutes ?? null,
      uncertain,
      reasons,
      recordedProgress: recorded && recorded.previousCoatId === coat.id ? recorded.progress : null,
    }
  }
  const jobSteps = steps.filter((s) => s.job_id === job.id)
  const verdict = coatVerdict({
    finished: finish !== null,
    hasNextCoat: !!next,
    lastOfPlan: !next && planComplete(jobSteps, jobCoats),
    waitedMinutes: flash?.waitedMinutes ?? null,
    requiredMinutes: flash?.requiredMinutes ?? null,
    progress,
    recoatWindowPassed: recoatPassed,
    recoatWindowMinutes: flash?.recoatWindowMinutes ?? null,
    uncertain,
    reasons,
    stats: flash?.stats ?? null,
    waterborne: rev?.product.chemistry === 'waterborne',
    overrideReasons: next ? next.overrides.filter((o) => o.kind === 'flash_not_complete').map((o) => o.reason) : [],
  })
  const painter = coat.painter_id !== null ? (users.get(coat.painter_id)?.name ?? null) : null
  return {
    id: coat.id,
    jobId: job.id,
    jobNumber: job.number,
    boothId: coat.booth_id,
    boothName,
    stepPosition: step?.position ?? null,
    product: revisionLabel(rev),
    revisionId: rev?.id ?? null,
    coatNumber: coat.coat_number,
    painter,
    startedAt: coat.started_at.toISOString(),
    finishedAt: coat.finished_at?.toISOString() ?? null,
    sprayMinutes: finish !== null ? r1((finish - start) / 60_000) : null,
    during,
    flash,
    overrides: coat.overrides.map((o) => ({ kind: o.kind, detail: o.detail, reason: o.reason })),
    verdict,
  }
}

async function bakesOf(db: Db, ids: number[], nowMs: number): Promise<BakeEvidence[]> {
  const out: BakeEvidence[] = []
  for (const id of ids) {
    const { bake, evaluation } = await getBake(db, id, nowMs)
    out.push({
      id: bake.id,
      boothName: bake.boothName,
      state: bake.state,
      startedAt: bake.startedAt,
      endedAt: bake.endedAt,
      targetC: evaluation?.targetC ?? bake.targetC,
      peakC: evaluation?.phases.peakC ?? null,
      holdMinutes: evaluation ? evaluation.phases.holdMinutes : null,
      verdict: evaluation?.judgement.verdict ?? bake.verdict,
      frozen: evaluation?.frozen ?? false,
      schedules: (evaluation?.judgement.products ?? []).flatMap((p) =>
        p.schedules.map((s) => ({
          label: s.label,
          requiredMinutes: s.requiredMinutes,
          specTempC: s.specTempC,
          equivalentMinutes: s.equivalentMinutes,
          heldMinutes: s.heldMinutes,
          verdict: s.verdict,
          reason: s.reason,
        })),
      ),
      jobs: bake.jobs.map((j) => j.number),
      signedOffBy: bake.signedOffBy,
      signedOffAt: bake.signedOffAt,
      signOffNotes: bake.signOffNotes,
      notes: bake.notes,
    })
  }
  return out
}

const iso = (d: Date | null) => (d ? d.toISOString() : null)

async function alertsOf(db: Db, boothIds: number[], from: Date, to: Date): Promise<AlertEvidence[]> {
  const rows = await alertsOfPeriod(db, boothIds, from, to)
  return rows.map((a) => ({
    id: a.id,
    boothName: a.booth_name,
    severity: a.severity,
    kind: a.kind,
    message: a.message,
    openedAt: a.opened_at.toISOString(),
    clearedAt: iso(a.cleared_at),
    state: a.state,
    acknowledged: a.acknowledged_at ? `acknowledged by ${a.acknowledged_by_name ?? 'someone'} at ${iso(a.acknowledged_at)!.slice(0, 16).replace('T', ' ')}${a.ack_note ? ` — "${a.ack_note}"` : ''}` : null,
    resolved: a.resolved_at
      ? a.resolution === 'manual'
        ? `resolved by ${a.resolved_by_name ?? 'someone'} at ${iso(a.resolved_at)!.slice(0, 16).replace('T', ' ')}${a.resolve_note ? ` — "${a.resolve_note}"` : ''}`
        : a.resolution === 'watch_removed'
          ? 'closed: the watch was removed'
          : 'resolved when the condition cleared'
      : null,
  }))
}

function flashText(r: { flash_min_minutes: number; flash_max_minutes: number; flash_before_next_minutes: number; ref_temp_c: number; recoat_window_minutes: number | null }) {
  const between = r.flash_min_minutes === r.flash_max_minutes ? num1(r.flash_min_minutes) : `${num1(r.flash_min_minutes)}–${num1(r.flash_max_minutes)}`
  const recoat = r.recoat_window_minutes !== null ? `; recoat within ${num1(r.recoat_window_minutes)} min` : ''
  return `${between} min between coats, ${num1(r.flash_before_next_minutes)} min before the next product, at ${num1(r.ref_temp_c)} °C${recoat}`
}

async function revisionsOf(db: Db, ids: number[]): Promise<RevisionEvidence[]> {
  const rows = await revisionsWithTds(db, [...new Set(ids)])
  return rows.map((r) => ({
    id: r.id,
    product: r.product_name,
    number: r.number,
    frozenAt: iso(r.frozen_at),
    tdsSha256: r.tds_sha256,
    tdsFileName: r.tds_name ?? null,
    flash: flashText(r),
  }))
}

async function calibrationsOf(db: Db, booths: BoothRow[], to: Date): Promise<CalibrationEvidence[]> {
  const out: CalibrationEvidence[] = []
  for (const b of booths) {
    const rows = await listCalibrations(db, b.id, 1000)
    for (const ch of CALIBRATED_CHANNELS) {
      const info = CHANNEL_INFO[ch]
      const cal = rows.find((r) => r.channel === ch && r.effective_at.getTime() <= to.getTime())
      let state = 'never calibrated'
      if (cal) state = cal.next_due_at === null ? 'no due date' : cal.next_due_at.getTime() < to.getTime() ? `overdue since ${cal.next_due_at.toISOString().slice(0, 10)}` : 'in date'
      out.push({
        boothName: b.name,
        channel: ch,
        label: info.label,
        state,
        effectiveAt: cal ? cal.effective_at.toISOString() : null,
        offset: cal ? cal.offset_value : null,
        unit: info.unit,
        instrument: cal ? cal.instrument : null,
        nextDueAt: cal ? iso(cal.next_due_at) : null,
      })
    }
  }
  return out
}

async function chainOf(db: Db): Promise<ChainEvidence> {
  const v = await verifyChain(db)
  if (v.intact) return { head: v.head, verified: true, count: v.count, brokenAt: null, reason: null }
  return { head: await chainHead(db), verified: false, count: v.count, brokenAt: v.brokenAt, reason: v.reason }
}

const MAX_CHART_MARKS = 60

async function chartsOf(db: Db, booths: BoothRow[], from: Date, to: Date, coats: CoatEvidence[], bakes: BakeEvidence[]): Promise<ChartSpec[]> {
  const charts: ChartSpec[] = []
  for (const b of booths) {
    const h = await boothHistory(db, b.id, from, to)
    if (!h.count) continue
    const t = h.t.map((x) => Date.parse(x))
    const series = (key: string) => thin(t.map((x, i): [number, number | null] => [x, h.series[key]?.[i] ?? null]), 1500)
    const multi = new Set(coats.map((c) => c.jobNumber)).size > 1
    const marks = [
      ...coats
        .filter((c) => c.boothId === b.id)
        .map((c) => ({ label: `${multi ? `${c.jobNumber} ` : ''}${c.stepPosition ?? '?'}.${c.coatNumber}`, from: Date.parse(c.startedAt), to: Date.parse(c.flash?.to ?? c.finishedAt ?? c.startedAt) })),
      ...bakes.filter((k) => k.boothName === b.name).map((k) => ({ label: 'bake', from: Date.parse(k.startedAt), to: Date.parse(k.endedAt ?? to.toISOString()) })),
    ].filter((m) => m.to > m.from)
    const shown = marks.length > MAX_CHART_MARKS ? marks.map((m) => ({ ...m, label: '' })) : marks
    charts.push({
      title: `Temperature, dew point and humidity — ${b.name}`,
      axes: ['°C', '%'],
      series: [
        { name: 'Air', unit: '°C', axis: 0, points: series('airTempC') },
        { name: 'Panel', unit: '°C', axis: 0, points: series('panelTempC') },
        { name: 'Dew point', unit: '°C', axis: 0, points: series('dewPointC') },
        { name: 'RH', unit: '%', axis: 1, points: series('rhPct') },
      ],
      marks: shown,
    })
    charts.push({
      title: `Airflow and booth pressure — ${b.name}`,
      axes: ['m/s', 'Pa'],
      series: [
        { name: 'Airflow', unit: 'm/s', axis: 0, points: series('airflowMps') },
        { name: 'Booth pressure', unit: 'Pa', axis: 1, points: series('boothDpPa') },
      ],
      marks: shown,
    })
  }
  return charts
}

// ── the report ─────────────────────────────────────────────────────────────────────────────────────

export async function buildReport(db: Db, s: ResolvedScope, by: Who, exportId: string, nowMs = Date.now()): Promise<EvidenceReport> {
  const notes: SectionNote[] = []
  const boothIds = s.booths.map((b) => b.id)
  const boothName = new Map(s.booths.map((b) => [b.id, b.name]))
  const allBooths = await listBooths(db)
  for (const b of allBooths) if (!boothName.has(b.id)) boothName.set(b.id, b.name)
  const users = new Map((await listUsers(db)).map((u) => [u.id, u]))

  // Coats in scope, and every coat of their jobs (a coat's flash ends at its job's next coat).
  const scopeCoats = await safely(notes, 'coats', [] as Coat[], async () =>
    s.job ? listCoatsOfJob(db, s.job.id) : (await Promise.all(boothIds.map((id) => coatsOfBoothInPeriod(db, id, s.from, s.to)))).flat().sort(byStart),
  )
  const jobIds = s.job ? [s.job.id] : [...new Set(scopeCoats.map((c) => c.job_id))]
  const jobs = s.job ? [s.job] : await jobsByIds(db, jobIds)
  const jobCoats = s.job ? scopeCoats : await coatsOfJobs(db, jobIds)
  const steps = await safely(notes, 'plan', [] as JobStep[], () => listStepsOfJobs(db, jobIds))
  const revs = await loadRevisions(db, steps.map((x) => x.revision_id))

  const coats: CoatEvidence[] = []
  for (const c of scopeCoats) {
    const job = jobs.find((j) => j.id === c.job_id)
    if (!job) continue
    coats.push(
      await coatEvidence(
        db,
        c,
        jobCoats.filter((x) => x.job_id === job.id),
        job,
        steps,
        revs,
        users,
        boothName.get(c.booth_id) ?? `booth ${c.booth_id}`,
        nowMs,
      ),
    )
  }

  const bakeIds = await safely(notes, 'bakes', [] as number[], () => (s.job ? bakeIdsOfJob(db, s.job.id) : bakeIdsOfPeriod(db, boothIds, s.from, s.to)))
  const bakes = await safely(notes, 'bakes', [] as BakeEvidence[], () => bakesOf(db, bakeIds, nowMs))
  const alerts = await safely(notes, 'alerts', [] as AlertEvidence[], () => alertsOf(db, boothIds, s.from, s.to))
  const revisionIds = s.job ? steps.map((x) => x.revision_id) : scopeCoats.map((c) => steps.find((x) => x.id === c.step_id)?.revision_id).filter((x): x is number => x !== undefined)
  const revisions = await safely(notes, 'revisions', [] as RevisionEvidence[], () => revisionsOf(db, revisionIds))
  const calibrations = await safely(notes, 'calibrations', [] as CalibrationEvidence[], () => calibrationsOf(db, s.booths, s.to))

  const signOffs: SignOffEvidence[] = []
  for (const b of bakes) {
    if (b.signedOffBy && b.signedOffAt) signOffs.push({ what: `Bake ${b.id} (${b.boothName}) signed off`, by: b.signedOffBy, at: b.signedOffAt, notes: b.signOffNotes })
  }
  const closings = await safely(notes, 'signoffs', [] as Awaited<ReturnType<typeof jobClosings>>, () => jobClosings(db, jobIds))
  for (const e of closings) {
    const data = JSON.parse(e.payload) as { to?: string; number?: string }
    if (data.to === 'done') signOffs.push({ what: `Job ${data.number ?? e.subject_id} closed (done)`, by: e.actor_label, at: e.at.toISOString(), notes: '' })
  }
  signOffs.sort((a, b) => a.at.localeCompare(b.at))

  const whole = wholeMinutes(s.from.getTime(), s.to.getTime())
  const [rows, gaps] = await Promise.all([
    countReadings(db, boothIds, s.from, s.to),
    minuteGaps(db, boothIds, new Date(whole.first), new Date(whole.last), MIN_GAP_MINUTES),
  ])
  const coverage = readingCoverage(rows, gaps.map((g) => ({ from: g.from.getTime(), to: g.to.getTime() })), s.from.getTime(), s.to.getTime(), MIN_GAP_MINUTES)
  const charts = await chartsOf(db, s.booths, s.from, s.to, coats, bakes)
  const chain = await chainOf(db)

  const countsDone = new Map<number, number>()
  for (const c of jobCoats) countsDone.set(c.step_id, (countsDone.get(c.step_id) ?? 0) + 1)
  const jobNumber = new Map(jobs.map((j) => [j.id, j.number]))
  return {
    exportId,
    title: s.title,
    scope: s.job ? { kind: 'job', jobId: s.job.id, jobNumber: s.job.number } : { kind: 'booth', boothId: s.booths[0]!.id },
    booths: s.booths.map((b) => ({ id: b.id, slug: b.slug, name: b.name })),
    period: { from: s.from.toISOString(), to: s.to.toISOString() },
    generatedAt: new Date(nowMs).toISOString(),
    generatedBy: { id: by.id, name: by.name, role: by.role },
    units: 'SI: °C, % relative humidity, m/s, Pa; times UTC',
    jobs: jobs.map((j) => ({
      id: j.id,
      number: j.number,
      vehicle: j.vehicle,
      colourCode: j.colour_code,
      panels: j.panels,
      notes: j.notes,
      status: j.status,
      painter: j.painter_id !== null ? (users.get(j.painter_id)?.name ?? null) : null,
      booth: j.booth_id !== null ? (boothName.get(j.booth_id) ?? null) : null,
      createdAt: j.created_at.toISOString(),
    })),
    plan: steps.map((x) => {
      const rev = revs.get(x.revision_id)
      return {
        jobNumber: jobNumber.get(x.job_id) ?? '',
        position: x.position,
        product: rev?.productName ?? 'unknown product',
        revisionNumber: rev?.number ?? null,
        coatsPlanned: x.coats_planned,
        coatsDone: countsDone.get(x.id) ?? 0,
        note: x.note,
      }
    }),
    coats,
    bakes,
    alerts,
    revisions,
    calibrations,
    signOffs,
    chain,
    coverage,
    charts,
    notes,
  }
}

/** The report without chart series (the page's preview). */
export function reportSummary(r: EvidenceReport) {
  const { charts, ...rest } = r
  return { ...rest, charts: charts.map((c) => ({ title: c.title, points: c.series.reduce((a, s) => a + s.points.length, 0) })) }
}
