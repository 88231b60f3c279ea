// Shapes shared by the bake and booth-upkeep code (server, pages). No framework imports.
import type { PhaseResult } from './phases'
import type { BakeJudgement } from './verdict'

export type BakeStateName = 'detected' | 'confirmed' | 'signed_off' | 'dismissed'
/** Who opened (or ended) a bake: a person, the controller's mode, or heater + rising panel temperature. */
export type BakeSource = 'manual' | 'mode' | 'heater'

export type UpkeepTask = 'intake_filter' | 'exhaust_filter' | 'inspection' | 'heater_service' | 'calibration'
export type NoteKind = 'note' | 'heater_service'

export interface InspectionItemResult {
  key: string
  ok: boolean
  note?: string
}

/** What is frozen on a bake at sign-off (and what the sign-off event carries). */
export interface BakeResultSnapshot {
  computedAt: string
  startedAt: string
  endedAt: string | null
  phases: PhaseResult
  judgement: BakeJudgement
}
