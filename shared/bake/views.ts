// What the bake and upkeep routes send (JSON: times as ISO strings unless named …Ms). Shared with the pages.
import type { PhaseResult } from './phases'
import type { Caution } from './safety'
import type { BakeSource, BakeStateName } from './types'
import type { BakeJudgement, Verdict } from './verdict'

export interface BakeSummaryView {
  id: number
  boothId: number
  boothName: string
  state: BakeStateName
  source: BakeSource
  running: boolean
  startedAt: string
  endedAt: string | null
  endSource: BakeSource | null
  targetC: number | null
  notes: string
  startedBy: string | null
  confirmedAt: string | null
  confirmedBy: string | null
  endedBy: string | null
  signedOffAt: string | null
  signedOffBy: string | null
  signOffNotes: string
  dismissReason: string | null
  verdict: Verdict | null
  jobs: { jobId: number; number: string; vehicle: string }[]
  actions: { confirm: boolean; dismiss: boolean; end: boolean; signOff: boolean }
}

export interface BakeProductView {
  jobId: number
  jobNumber: string
  vehicle: string
  revisionId: number | null
  productName: string | null
  revisionNumber: number | null
  schedules: string[]
  note: string | null
}

export interface BakeEvaluationView {
  computedAt: string
  frozen: boolean
  running: boolean
  evaluatedUntil: string
  targetC: number | null
  targetSource: 'tech' | 'spec' | 'inferred' | null
  phaseNow: string | null
  panelTempNowC: number | null
  phases: PhaseResult
  judgement: BakeJudgement
}

export interface BakeDetailView {
  bake: BakeSummaryView & { products: BakeProductView[] }
  evaluation: BakeEvaluationView | null
  safety: { cautions: Caution[]; deferral: string }
}

export interface ReminderView {
  task: string
  label: string
  status: 'due' | 'soon' | 'ok'
  boothId: number
  boothName: string
  lastDoneAt: string | null
  reasons: { by: string; status: 'due' | 'soon' | 'ok'; message: string; dueAt: string | null }[]
  trend: { slopePaPerDay: number; daysToLimit: number | null; points: number } | null
}

export interface HistoryItemView {
  kind: 'bake' | 'filter_change' | 'calibration' | 'inspection' | 'note' | 'heater_service'
  id: number
  at: string
  title: string
  detail: string
  by: string | null
  ok: boolean | null
  link: string | null
}

export interface CountersView {
  boothId: number
  from: string | null
  to: string
  countingSince: string | null
  hoursByMode: Record<'idle' | 'spray' | 'flash' | 'bake' | 'cool', number>
  boothHours: number
  bakeCycles: number
}

export interface RuleView {
  task: string
  intervalDays: number | null
  intervalBoothHours: number | null
  intervalBakeCycles: number | null
  dpLimitPa: number | null
  trendHorizonDays: number | null
  custom: boolean
}

export interface CalibrationView {
  id: number
  boothId: number
  channel: string
  channelLabel: string
  unit: string
  effectiveAt: string
  referenceValue: number
  sensorValue: number
  offset: number
  instrument: string
  nextDueAt: string | null
  notes: string
  recordedBy: string | null
  createdAt: string
}

export const BAKE_STATE_LABELS: Record<BakeStateName, string> = {
  detected: 'To confirm',
  confirmed: 'Confirmed',
  signed_off: 'Signed off',
  dismissed: 'Not a bake',
}

export const BAKE_SOURCE_LABELS: Record<BakeSource, string> = {
  manual: 'Started by hand',
  mode: 'Booth controller',
  heater: 'Heater and panel temperature',
}

export const VERDICT_LABELS: Record<Verdict, string> = {
  pass: 'Pass',
  fail: 'Fail',
  pending: 'Curing',
  unknown: 'No verdict',
}

export const PHASE_LABELS: Record<string, string> = { purge: 'Purge', ramp: 'Ramp', hold: 'Hold', cool: 'Cool' }
