import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { CreateJobInput, FinishStepInput, JobStatusValue, UpdateJobInput } from '#shared/schemas/jobs'

// Jobs (repair orders) and the booth screen state as the API sends them, and the calls that read or
// change them. Server errors are thrown as $fetch errors: read them with apiFailure().

export const JOB_STATUS_LABELS: Record<JobStatusValue, string> = {
  planned: 'Planned',
  in_booth: 'In booth',
  curing: 'Curing',
  done: 'Done',
}

export interface Person {
  id: number
  name: string
}

export interface RevisionSummary {
  id: number
  number: number
  productId: number
  productName: string
  category: string
  chemistry: 'solvent' | 'waterborne'
  components: 1 | 2
  coats: number
  flashMinMinutes: number
  flashMaxMinutes: number
  flashBeforeNextMinutes: number
  potLifeMinutes: number | null
  mixRatio: string | null
  frozen: boolean
}

export interface JobHead {
  id: number
  number: string
  vehicle: string
  colourCode: string
  panels: string[]
  notes: string
  status: JobStatusValue
  painter: Person | null
  booth: Person | null
  createdAt: string
  updatedAt: string
}

export interface JobListItem extends JobHead {
  coatsPlanned: number
  coatsDone: number
  steps: number
}

export interface CoatOverrideView {
  kind: 'flash_not_complete' | 'outside_application_window' | 'condensation_guard'
  detail: string
  reason: string
}

export interface CoatView {
  id: number
  stepId: number
  boothId: number
  coatNumber: number
  painter: Person | null
  startedAt: string
  finishedAt: string | null
  sprayMinutes: number | null
  overrides: CoatOverrideView[]
  flash: {
    previousCoatId: number
    kind: 'between_coats' | 'next_product'
    waitedMinutes: number
    progress: number | null
    ready: boolean
    readyAt: string | null
    requiredMinutes: number | null
    uncertain: boolean
  } | null
  applicationWindow: { ok: boolean; problems: string[] } | null
  condensation: { ok: boolean; marginC: number | null } | null
}

export interface MixView {
  id: number
  boothId: number
  jobId: number | null
  stepId: number | null
  revision: RevisionSummary | null
  reducerGrade: string | null
  reducerAdvised: string | null
  amountMl: number | null
  airTempC: number | null
  painter: Person | null
  mixedAt: string
  closedAt: string | null
  outcome: 'used' | 'discarded' | null
  warnings: string[]
}

export interface JobStepView {
  id: number
  position: number
  revisionId: number
  revision: RevisionSummary | null
  coatsPlanned: number
  coatsDone: number
  note: string
}

export interface JobDetail {
  job: JobHead
  steps: JobStepView[]
  coats: CoatView[]
  mixes: MixView[]
  boothBusy: { coatId: number; jobId: number } | null
}

export interface PlanOptions {
  revisions: RevisionSummary[]
  painters: (Person & { role: string })[]
  booths: (Person & { kind: string })[]
}

export type EstimateReason =
  | 'invalid-input'
  | 'data-gap'
  | 'no-current-reading'
  | 'no-progress-now'
  | 'airflow-assumed'
  | 'table-ignored'
  | 'panel-estimated'
  | 'below-min-cure-now'
  | 'gap-counted-conservatively'

/** GET /api/booths/:id/screen and the `screen` events of …/screen/stream. */
export interface BoothScreenState {
  boothId: number
  booth: { id: number; name: string; kind: string; hasHeater: boolean }
  units: { temperature: 'C' | 'F'; airflow: 'm/s' | 'ft/min'; pressure: 'Pa' | 'inH2O' }
  serverTime: string
  conditions: {
    reading: {
      ts: string
      receivedAt: string
      airTempC: number | null
      rhPct: number | null
      panelTempC: number | null
      airflowMps: number | null
      boothDpPa: number | null
      dewPointC: number | null
      dewPointMarginC: number | null
      heaterOn: boolean | null
    } | null
    mode: string | null
    modeSince: string | null
    deviceStatus: string | null
    stale: boolean
    lastReadingAt: string | null
  }
  job: { id: number; number: string; vehicle: string; colourCode: string; panels: string[]; notes: string; status: JobStatusValue; painter: string | null; painterId: number | null } | null
  plan: { stepId: number; position: number; revisionId: number; product: string; category: string | null; chemistry: string | null; components: number | null; coatsPlanned: number; coatsDone: number; current: boolean }[]
  coatInProgress: { id: number; stepId: number; position: number; coatNumber: number; product: string; startedAt: string; painter: string | null } | null
  lastCoat: { id: number; stepId: number; position: number; coatNumber: number; product: string; finishedAt: string | null; painter: string | null } | null
  nextCoat: {
    stepId: number
    position: number
    coatNumber: number
    coatsPlanned: number
    revisionId: number
    product: string
    chemistry: string | null
    components: number | null
    mixRatio: string | null
    newProduct: boolean
  } | null
  planComplete: boolean
  flash: {
    coatId: number
    stage: 'between-coats' | 'before-next'
    product: string
    finishedAt: string
    flashMinMinutes: number
    flashMaxMinutes: number
    progress: number | null
    ready: boolean
    readyAt: string | null
    readyBy: string | null
    recoatWindowEndsAt: string | null
    recoatWindowPassed: boolean
    rateNow: number | null
    uncertain: boolean
    reasons: EstimateReason[]
  } | null
  checks: {
    flashReady: boolean | null
    applicationWindow: { product: string | null; ok: boolean; problems: { channel: string; value: number | null; limit: number; kind: string }[] }
    condensation: { ok: boolean; marginC: number | null; dewPointC: number | null; minMarginC: number }
    needsReason: ('flash_not_complete' | 'outside_application_window' | 'condensation_guard')[]
  }
  reducer: { product: string; airTempC: number | null; advised: string | null; bands: { minC: number | null; maxC: number | null; grade: string }[] } | null
  mixes: {
    id: number
    revisionId: number
    product: string
    reducerGrade: string | null
    reducerAdvised: string | null
    amountMl: number | null
    mixedAt: string
    painter: string | null
    warnings: string[]
    potLife: { minutes: number; usedFraction: number | null; expired: boolean; expiresAt: string | null; uncertain: boolean; reasons: EstimateReason[] } | null
  }[]
  mixChoices: { revisionId: number; stepId: number; product: string; bands: string[] }[]
  people: { id: number; name: string; role: string }[]
  twoK: boolean
}

/**
 *   const jobs = useJobsStore()
 *   await jobs.fetchList('active'); jobs.list
 *   const d = await jobs.fetchDetail(12)
 *   await jobs.create({...}); await jobs.update(12, {...}); await jobs.savePlan(12, steps)
 */
export const useJobsStore = defineStore('jobs', () => {
  const list = ref<JobListItem[]>([])
  const options = ref<PlanOptions | null>(null)
  const request = useRequestFetch()

  async function fetchList(status: JobStatusValue | 'active' | 'all' = 'all'): Promise<JobListItem[]> {
    const res = await request<{ jobs: JobListItem[] }>('/api/jobs', { query: { status } })
    list.value = res.jobs
    return res.jobs
  }

  function fetchDetail(id: number): Promise<JobDetail> {
    return request<JobDetail>(`/api/jobs/${id}`)
  }

  async function fetchOptions(): Promise<PlanOptions> {
    options.value ??= await request<PlanOptions>('/api/jobs/plan-options')
    return options.value
  }

  function create(input: CreateJobInput): Promise<JobDetail> {
    return $fetch<JobDetail>('/api/jobs', { method: 'POST', body: input })
  }

  function update(id: number, input: UpdateJobInput): Promise<JobDetail> {
    return $fetch<JobDetail>(`/api/jobs/${id}`, { method: 'PATCH', body: input })
  }

  function savePlan(id: number, steps: FinishStepInput[]): Promise<JobDetail> {
    return $fetch<JobDetail>(`/api/jobs/${id}/steps`, { method: 'PUT', body: { steps } })
  }

  function fetchScreen(boothId: number): Promise<BoothScreenState> {
    return request<BoothScreenState>(`/api/booths/${boothId}/screen`)
  }

  return { list, options, fetchList, fetchDetail, fetchOptions, create, update, savePlan, fetchScreen }
})

// ── small formatting helpers shared by the jobs pages and the booth screen ──────────────────────

/** "4:05", "12:00", "1:02:03" for a span in ms (rounded up to the next second while counting down). */
export function countdownText(ms: number): string {
  const s = Math.max(0, Math.ceil(ms / 1000))
  const h = Math.floor(s / 3600)
  const m = Math.floor((s % 3600) / 60)
  const sec = s % 60
  const pad = (n: number) => String(n).padStart(2, '0')
  return h > 0 ? `${h}:${pad(m)}:${pad(sec)}` : `${m}:${pad(sec)}`
}

/** Local wall-clock time "14:05" of an ISO time; "—" when missing. */
export function clockTime(iso: string | null | undefined): string {
  if (!iso) return '—'
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return '—'
  return `${String(d.getHours()).padStart(2, '0')}:${String(d.getMinutes()).padStart(2, '0')}`
}

/** "3 Dec 14:05" of an ISO time. */
export function dateTime(iso: string | null | undefined): string {
  if (!iso) return '—'
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return '—'
  return `${d.getDate()} ${['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'][d.getMonth()]} ${clockTime(iso)}`
}

export const CATEGORY_WORDS: Record<string, string> = {
  primer_surfacer: 'Primer surfacer',
  sealer: 'Sealer',
  wet_bed_binder: 'Wet-bed binder',
  basecoat: 'Basecoat',
  clearcoat: 'Clearcoat',
  other: 'Other',
}

export const OVERRIDE_LABELS: Record<CoatOverrideView['kind'], string> = {
  flash_not_complete: 'Started before the flash-off was complete',
  outside_application_window: "Outside the product's application window",
  condensation_guard: 'Near the dew point (condensation guard)',
}

/** The status a job's pill shows: word, and the state level of the design system. */
export function jobStatusLevel(s: JobStatusValue): 'ok' | 'attention' | 'offline' | 'fault' {
  return s === 'done' ? 'ok' : s === 'planned' ? 'offline' : 'attention'
}
