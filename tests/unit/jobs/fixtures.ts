import type { Sample } from '#shared/cure'
import { DEMO_PRODUCTS } from '../../../server/domain/demo-specs'
import type { Coat, Job, JobStep, Mix } from '../../../server/db/tables/jobs'
import type { RevisionInfo } from '../../../server/domain/jobs'

// Rows as the repositories return them, built from the invented demo products.

export const MIN = 60_000
export const T0 = Date.UTC(2026, 2, 3, 8, 0, 0)

export function revision(id: number, productName: string): RevisionInfo {
  const d = DEMO_PRODUCTS.find((p) => p.product.name === productName)
  if (!d) throw new Error(`no demo product ${productName}`)
  return {
    id,
    number: 1,
    productId: id,
    productName,
    category: d.product.category,
    product: { chemistry: d.product.chemistry, components: d.product.components },
    fields: d.revision,
    frozen: false,
  }
}

export const PRIMER = revision(1, '2K high-build primer surfacer')
export const WET_BED = revision(2, 'Clear binder wet bed')
export const BASE = revision(3, 'Waterborne basecoat, silver metallic')
export const CLEAR = revision(4, '2K high-solids clearcoat')
export const REVISIONS = new Map([PRIMER, WET_BED, BASE, CLEAR].map((r) => [r.id, r]))

export function job(extra: Partial<Job> = {}): Job {
  return {
    id: 7,
    number: 'RO-24117',
    vehicle: 'Compact hatchback, rear quarter panel',
    colour_code: 'SLV-07',
    panels: ['left rear quarter panel'],
    notes: '',
    painter_id: 4,
    booth_id: 1,
    status: 'in_booth',
    created_by: null,
    created_at: new Date(T0 - 3_600_000),
    updated_at: new Date(T0 - 3_600_000),
    ...extra,
  }
}

/** The demo plan: primer ×2 → wet bed ×1 → basecoat ×2 → clearcoat ×2. */
export function steps(): JobStep[] {
  return [
    { id: 11, job_id: 7, position: 1, revision_id: PRIMER.id, coats_planned: 2, note: '' },
    { id: 12, job_id: 7, position: 2, revision_id: WET_BED.id, coats_planned: 1, note: '' },
    { id: 13, job_id: 7, position: 3, revision_id: BASE.id, coats_planned: 2, note: '' },
    { id: 14, job_id: 7, position: 4, revision_id: CLEAR.id, coats_planned: 2, note: '' },
  ]
}

let nextCoatId = 100
export function coat(stepId: number, n: number, startedAt: number, finishedAt: number | null): Coat {
  return {
    id: nextCoatId++,
    job_id: 7,
    step_id: stepId,
    booth_id: 1,
    coat_number: n,
    painter_id: 4,
    started_at: new Date(startedAt),
    finished_at: finishedAt === null ? null : new Date(finishedAt),
    overrides: [],
    start_check: {},
    finished_by: null,
  }
}

export function mix(revisionId: number, mixedAt: number, extra: Partial<Mix> = {}): Mix {
  return {
    id: 501,
    booth_id: 1,
    job_id: 7,
    step_id: 14,
    revision_id: revisionId,
    reducer_grade: 'Standard',
    amount_ml: 500,
    painter_id: 4,
    mixed_at: new Date(mixedAt),
    closed_at: null,
    close_outcome: null,
    closed_by: null,
    air_temp_c: 20,
    reducer_advised: 'Standard',
    warnings: [],
    ...extra,
  }
}

/** Readings every `stepMs` over [from, to] with the given values. */
export function series(from: number, to: number, values: Omit<Sample, 't'>, stepMs = 10_000): Sample[] {
  const out: Sample[] = []
  for (let t = from; t <= to; t += stepMs) out.push({ t, ...values })
  return out
}

export const REFERENCE = { airTempC: 20, rhPct: 50, panelTempC: 20, airflowMps: 0.3 }
