// JSON shapes of the spec sheet routes as the pages read them (dates arrive as ISO strings).
import type { Chemistry, Components, ProductCategory, SpecRevisionFields } from '../schemas/spec'

export interface ProductDTO {
  id: number
  name: string
  category: ProductCategory
  chemistry: Chemistry
  components: Components
  notes: string
  createdAt: string
  updatedAt: string
}

export interface ProductListItemDTO extends ProductDTO {
  revisionCount: number
  latestRevision: { id: number; number: number; frozenAt: string | null; hasTds: boolean } | null
}

export interface TdsFileDTO {
  sha256: string
  sizeBytes: number
  name: string
  uploadedAt: string
  url: string
}

export interface SpecRevisionDTO extends SpecRevisionFields {
  id: number
  productId: number
  number: number
  frozenAt: string | null
  tds: TdsFileDTO | null
  createdAt: string
  createdBy: string | null
  updatedAt: string
  updatedBy: string | null
}

export interface ProductDetailDTO {
  product: ProductDTO
  revisions: SpecRevisionDTO[]
}

export interface TimeAtConditionsDTO {
  minutes: number | null
  refMinutes: number
}

export interface SpecPreviewDTO {
  revisionId: number | null
  conditions: { airTempC: number; rhPct: number; airflowMps: number | null; panelTempC: number | null; cureTempC: number; dewPointC: number | null }
  flash: {
    betweenCoats: { min: TimeAtConditionsDTO; max: TimeAtConditionsDTO }
    beforeNext: TimeAtConditionsDTO
    recoatWindow: TimeAtConditionsDTO | null
    rate: number | null
    airflowAssumed: boolean
    reasons: string[]
  }
  potLife: TimeAtConditionsDTO | null
  airDry: { dustFree: TimeAtConditionsDTO | null; handle: TimeAtConditionsDTO | null; sandPolish: TimeAtConditionsDTO | null }
  cure: {
    eaJPerMol: number
    eaSource: 'schedule' | 'q10'
    panelAssumed: boolean
    schedules: {
      objectTempC: number
      requiredMinutes: number
      atTempC: number
      creditMinutes: number | null
      creditFraction: number | null
      minutesToComplete: number | null
    }[]
  }
  reducer: { bands: number; advised: string | null }
  application: { ok: boolean; problems: { channel: 'airTempC' | 'panelTempC' | 'rhPct'; value: number | null; limit: number; kind: 'below' | 'above' | 'missing' }[] }
  condensation: { ok: boolean; marginC: number | null; dewPointC: number | null }
  summary: string[]
}

/** "12 min", "4.5 min", "2 h 10 min" for a duration in minutes; "—" when there is none. */
export function formatDuration(m: number | null | undefined): string {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—'
  if (m < 10) return `${Math.round(m * 10) / 10} min`
  if (m < 90) return `${Math.round(m)} min`
  const total = Math.round(m)
  const h = Math.floor(total / 60)
  const rest = total % 60
  return rest ? `${h} h ${rest} min` : `${h} h`
}

/** "1.2 MB", "340 kB" for a size in bytes. */
export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / 1024 / 1024).toFixed(1)} MB`
  if (n >= 1024) return `${Math.round(n / 1024)} kB`
  return `${n} B`
}
