// Words, icons and state levels for booths. Each state has a word and an icon, never colour alone.
import type { Booth, BoothMode } from '~/stores/booths'

export type IconName =
  | 'ok'
  | 'attention'
  | 'fault'
  | 'offline'
  | 'idle'
  | 'spray'
  | 'flash'
  | 'bake'
  | 'cool'
  | 'unknown'
  | 'chevron-down'
  | 'arrow-left'
  | 'user'
  | 'live'
  | 'heater'
  | 'job'
  | 'bell'

/** The four state levels of the design system (tailwind colours `ok`, `attention`, `fault`, `offline`). */
export type StateLevel = 'ok' | 'attention' | 'fault' | 'offline'

export const LEVEL_ICON: Record<StateLevel, IconName> = { ok: 'ok', attention: 'attention', fault: 'fault', offline: 'offline' }

export const MODE_INFO: Record<BoothMode | 'unknown', { label: string; icon: IconName; hint: string }> = {
  idle: { label: 'Idle', icon: 'idle', hint: 'No cycle running' },
  spray: { label: 'Spraying', icon: 'spray', hint: 'Spray cycle: full airflow' },
  flash: { label: 'Flash-off', icon: 'flash', hint: 'Coat flashing off between coats' },
  bake: { label: 'Bake', icon: 'bake', hint: 'Bake cycle: heater running the cure' },
  cool: { label: 'Cool-down', icon: 'cool', hint: 'Cooling after a bake' },
  unknown: { label: 'Mode unknown', icon: 'unknown', hint: 'The booth controller has not reported a mode' },
}

export const KIND_LABELS: Record<string, string> = {
  downdraft: 'Downdraft booth',
  semi_downdraft: 'Semi-downdraft booth',
  crossdraft: 'Crossdraft booth',
  prep_deck: 'Prep deck',
}

export function kindLabel(kind: string): string {
  return KIND_LABELS[kind] ?? kind.replace(/_/g, ' ')
}

/** Coatings practice: keep the surface at least 3 °C above the dew point. */
export const DEW_POINT_MARGIN_MIN_C = 3

export interface LiveState {
  level: StateLevel
  /** One or two words: "Live", "Stale", "Offline", "No readings". */
  label: string
  /** A sentence for the tile / screen reader. */
  detail: string
}

/** "just now", "40 s ago", "3 min ago", "2 h ago", "4 d ago". */
export function agoText(fromMs: number, nowMs: number): string {
  const s = Math.max(0, Math.round((nowMs - fromMs) / 1000))
  if (s < 5) return 'just now'
  if (s < 60) return `${s} s ago`
  const m = Math.round(s / 60)
  if (m < 60) return `${m} min ago`
  const h = Math.round(m / 60)
  if (h < 48) return `${h} h ago`
  return `${Math.round(h / 24)} d ago`
}

/** Is this booth's data live, stale, or is the device offline? `nowMs` on the server's clock. */
export function liveState(b: Pick<Booth, 'latest' | 'stale' | 'deviceStatus'>, nowMs: number = Date.now()): LiveState {
  const last = b.latest ? Date.parse(b.latest.receivedAt || b.latest.ts) : Number.NaN
  const ago = Number.isFinite(last) ? agoText(last, nowMs) : null
  if (b.deviceStatus === 'offline') {
    return { level: 'offline', label: 'Offline', detail: ago ? `Sensor unit offline. Last reading ${ago}.` : 'Sensor unit offline. No readings yet.' }
  }
  if (!b.latest) return { level: 'offline', label: 'No readings', detail: 'No readings from this booth yet.' }
  if (b.stale) return { level: 'attention', label: 'Stale', detail: `No new reading. Last one ${ago ?? 'a while ago'}; values may be out of date.` }
  return { level: 'ok', label: 'Live', detail: `Live. Last reading ${ago ?? 'just now'}.` }
}

export function dewPointLevel(marginC: number | null | undefined): StateLevel | null {
  if (typeof marginC !== 'number' || !Number.isFinite(marginC)) return null
  return marginC < DEW_POINT_MARGIN_MIN_C ? 'fault' : 'ok'
}

/** What a dashboard tile shows in its default "active job" area (see BoothTile's `job` prop). */
export interface TileJob {
  /** e.g. "RO 4471 · 2K clearcoat, coat 2" */
  title: string
  /** e.g. "Flash progress 62 % · ready in about 6 min" */
  detail?: string
  /** 0…1 flash progress or cure credit; shows a bar when given. */
  progress?: number | null
  level?: StateLevel
}
