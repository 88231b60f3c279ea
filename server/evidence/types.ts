// The evidence report as plain data: built from the database by report.ts, rendered by pdf.ts, summarised by
// manifest.ts and returned (without the chart series) by GET /api/evidence/summary. No I/O here.

export interface Range {
  min: number
  max: number
  mean: number
}

/** Conditions over a span of time: min / max / mean of each quantity, null when no reading had it. */
export interface ConditionStats {
  /** Readings in the span. */
  n: number
  airTempC: Range | null
  rhPct: Range | null
  panelTempC: Range | null
  /** Surface (panel, else air) − dew point, °C. */
  dewPointMarginC: Range | null
  airflowMps: Range | null
}

export type CoatVerdictCode = 'followed' | 'too_early' | 'past_window' | 'unknown' | 'last_coat' | 'in_progress'

export interface CoatVerdict {
  code: CoatVerdictCode
  /** One plain line, e.g. "waited 9 min; 7.5 min needed at 17 °C / 64 % RH → followed the data sheet". */
  reason: string
}

export interface CoatFlashEvidence {
  /** Between two coats of the product, or its flash before the next product. */
  kind: 'between_coats' | 'next_product'
  /** The coat that followed (its start ends the flash). */
  nextCoatId: number
  from: string
  to: string
  stats: ConditionStats
  /** Data sheet flash at the reference temperature (min … max), minutes. */
  specMinMinutes: number
  specMaxMinutes: number
  refTempC: number
  /** Flash the conditions required (cure engine), minutes; null when it cannot be computed. */
  requiredMinutes: number | null
  /** Next coat start − this coat finish, minutes. */
  waitedMinutes: number
  /** Flash progress at the next coat's start (1 = minimum flash reached). */
  progress: number | null
  /** End of the recoat window, minutes after the coat; null when the data sheet gives none / unknown. */
  recoatWindowMinutes: number | null
  uncertain: boolean
  reasons: string[]
  /** What the booth screen's guard rail recorded when the next coat started (progress 0…1), if stored. */
  recordedProgress: number | null
}

export interface CoatEvidence {
  id: number
  jobId: number
  jobNumber: string
  boothId: number
  boothName: string
  stepPosition: number | null
  product: string
  revisionId: number | null
  coatNumber: number
  painter: string | null
  startedAt: string
  finishedAt: string | null
  sprayMinutes: number | null
  during: ConditionStats
  flash: CoatFlashEvidence | null
  overrides: { kind: string; detail: string; reason: string }[]
  verdict: CoatVerdict
}

export interface JobEvidence {
  id: number
  number: string
  vehicle: string
  colourCode: string
  panels: string[]
  notes: string
  status: string
  painter: string | null
  booth: string | null
  createdAt: string
}

export interface PlanStepEvidence {
  jobNumber: string
  position: number
  product: string
  revisionNumber: number | null
  coatsPlanned: number
  coatsDone: number
  note: string
}

export interface BakeScheduleEvidence {
  label: string
  requiredMinutes: number
  specTempC: number
  equivalentMinutes: number | null
  heldMinutes: number | null
  verdict: string
  reason: string
}

export interface BakeEvidence {
  id: number
  boothName: string
  state: string
  startedAt: string
  endedAt: string | null
  targetC: number | null
  peakC: number | null
  holdMinutes: number | null
  verdict: string | null
  frozen: boolean
  schedules: BakeScheduleEvidence[]
  jobs: string[]
  signedOffBy: string | null
  signedOffAt: string | null
  signOffNotes: string
  notes: string
}

export interface AlertEvidence {
  id: number
  boothName: string
  severity: string
  kind: string
  message: string
  openedAt: string
  clearedAt: string | null
  state: string
  acknowledged: string | null
  resolved: string | null
}

export interface RevisionEvidence {
  id: number
  product: string
  number: number
  frozenAt: string | null
  tdsSha256: string | null
  tdsFileName: string | null
  flash: string
}

export interface CalibrationEvidence {
  boothName: string
  channel: string
  label: string
  /** 'in date', 'overdue', 'never calibrated', 'no due date'. */
  state: string
  effectiveAt: string | null
  offset: number | null
  unit: string
  instrument: string | null
  nextDueAt: string | null
}

export interface SignOffEvidence {
  what: string
  by: string
  at: string
  notes: string
}

export interface ChainEvidence {
  head: { seq: number; hash: string } | null
  verified: boolean
  count: number
  brokenAt: number | null
  reason: string | null
}

export interface ReadingCoverage {
  rows: number
  expectedRows: number
  /** rows / expected (1 Hz), 0…1 (may exceed 1 for faster devices). */
  ratio: number
  /** Spans of ≥ minGapMinutes whole minutes without a reading. */
  gaps: { from: string; to: string; minutes: number }[]
  minGapMinutes: number
}

export interface ChartSeries {
  name: string
  unit: string
  axis: 0 | 1
  points: [number, number | null][]
}

export interface ChartSpec {
  title: string
  axes: [string, string?]
  series: ChartSeries[]
  /** Shaded spans (coats, bakes). */
  marks: { label: string; from: number; to: number }[]
}

export interface BoothRef {
  id: number
  slug: string
  name: string
}

export type EvidenceScope =
  | { kind: 'job'; jobId: number }
  | { kind: 'booth'; boothId: number; from: Date; to: Date }

/** A section whose area's table is missing (not yet migrated) says so instead of failing the pack. */
export interface SectionNote {
  section: string
  note: string
}

export interface EvidenceReport {
  exportId: string
  title: string
  scope: { kind: 'job'; jobId: number; jobNumber: string } | { kind: 'booth'; boothId: number }
  booths: BoothRef[]
  period: { from: string; to: string }
  generatedAt: string
  generatedBy: { id: number; name: string; role: string }
  units: string
  jobs: JobEvidence[]
  plan: PlanStepEvidence[]
  coats: CoatEvidence[]
  bakes: BakeEvidence[]
  alerts: AlertEvidence[]
  revisions: RevisionEvidence[]
  calibrations: CalibrationEvidence[]
  signOffs: SignOffEvidence[]
  chain: ChainEvidence
  coverage: ReadingCoverage
  charts: ChartSpec[]
  notes: SectionNote[]
}
