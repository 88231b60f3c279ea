// Shapes of the evidence API as the pages read them (server/evidence/types.ts, exports-view.ts). Types only:
// a .ts file here would be taken for a component.

export type VerdictCode = 'followed' | 'too_early' | 'past_window' | 'unknown' | 'last_coat' | 'in_progress'

export interface Range {
  min: number
  max: number
  mean: number
}

export interface CoatSummary {
  id: number
  jobNumber: string
  boothName: string
  stepPosition: number | null
  coatNumber: number
  product: string
  startedAt: string
  finishedAt: string | null
  flash: { waitedMinutes: number; requiredMinutes: number | null; stats: { airTempC: Range | null; rhPct: Range | null } } | null
  verdict: { code: VerdictCode; reason: string }
}

export interface ChainState {
  head: { seq: number; hash: string } | null
  verified: boolean
  count: number
  brokenAt: number | null
  reason: string | null
}

export interface PackSummary {
  title: string
  period: { from: string; to: string }
  booths: { id: number; slug: string; name: string }[]
  coats: CoatSummary[]
  bakes: { id: number; boothName: string; startedAt: string; verdict: string | null; state: string }[]
  alerts: { id: number; message: string; openedAt: string; state: string }[]
  revisions: { id: number; product: string; number: number; tdsSha256: string | null }[]
  calibrations: { boothName: string; label: string; state: string }[]
  signOffs: { what: string; by: string; at: string }[]
  chain: ChainState
  coverage: { rows: number; expectedRows: number; ratio: number; gaps: { from: string; to: string; minutes: number }[] }
  notes: { section: string; note: string }[]
}

export interface ExportRecord {
  id: string
  kind: 'pack' | 'csv'
  scope: 'job' | 'booth'
  job: { id: number; number: string | null } | null
  booth: { id: number; name: string | null } | null
  from: string
  to: string
  exportedAt: string
  exportedBy: string
  fileName: string
  files: { name: string; sha256: string; bytes: number }[]
  manifestSha256: string | null
  readings: number
  eventSeq: number
}
