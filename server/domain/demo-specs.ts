import type { Transaction } from 'kysely'
import { completeRevision, type ProductInput, type SpecRevisionFields } from '#shared/schemas/spec'
import type { Database } from '../db/database'
import { insertProduct, insertRevision } from '../repositories/specs'
import { appendEvent } from './event-log'

// The invented demo products (DESIGN.md §10): generic names, no brands, values made up within the
// usual ranges of refinish data sheets. Each gets one draft revision.

const SEED_ACTOR = { id: null, label: 'Demo seed' }

export const DEMO_PRODUCTS: { product: ProductInput; revision: SpecRevisionFields }[] = [
  {
    product: {
      name: '2K high-build primer surfacer',
      category: 'primer_surfacer',
      chemistry: 'solvent',
      components: 2,
      notes: 'Invented demo product. Block-sand when dry; fill and level over body filler.',
    },
    revision: completeRevision({
      refTempC: 20,
      flashMinMinutes: 5,
      flashMaxMinutes: 10,
      flashBeforeNextMinutes: 15,
      coats: 3,
      potLifeMinutes: 60,
      mixRatio: '4:1:1',
      reducerBands: [
        { fromC: null, toC: 18, grade: 'Fast' },
        { fromC: 18, toC: 25, grade: 'Standard' },
        { fromC: 25, toC: null, grade: 'Slow' },
      ],
      minAirTempC: 15,
      maxAirTempC: 35,
      minRhPct: 20,
      maxRhPct: 80,
      dustFreeMinutes: 15,
      handleMinutes: 90,
      sandPolishMinutes: 180,
      bakeSchedules: [{ objectTempC: 60, minutes: 20 }],
      minCureTempC: 10,
      q10: 2,
    }),
  },
  {
    product: {
      name: 'Waterborne basecoat, silver metallic',
      category: 'basecoat',
      chemistry: 'waterborne',
      components: 1,
      notes: 'Invented demo product. Flash to an even matte before the next coat; finish with a drop coat. Clear within the recoat window.',
    },
    revision: completeRevision({
      refTempC: 20,
      flashMinMinutes: 4,
      flashMaxMinutes: 8,
      flashBeforeNextMinutes: 15,
      recoatWindowMinutes: 1440,
      coats: 3,
      mixRatio: '10:1',
      reducerBands: [
        { fromC: null, toC: 25, grade: 'Waterborne thinner, standard' },
        { fromC: 25, toC: null, grade: 'Waterborne thinner, slow' },
      ],
      minAirTempC: 15,
      maxAirTempC: 35,
      minRhPct: 30,
      maxRhPct: 80,
      dustFreeMinutes: 10,
      q10: 2,
      wbRefRhPct: 50,
      wbRefAirflowMps: 0.3,
      wbAirflowExponent: 0.5,
    }),
  },
  {
    product: {
      name: '2K high-solids clearcoat',
      category: 'clearcoat',
      chemistry: 'solvent',
      components: 2,
      notes: 'Invented demo product. Two full coats over flashed basecoat.',
    },
    revision: completeRevision({
      refTempC: 20,
      flashMinMinutes: 5,
      flashMaxMinutes: 10,
      flashBeforeNextMinutes: 10,
      coats: 2,
      potLifeMinutes: 120,
      mixRatio: '2:1:0.2',
      reducerBands: [
        { fromC: null, toC: 18, grade: 'Fast' },
        { fromC: 18, toC: 27, grade: 'Standard' },
        { fromC: 27, toC: null, grade: 'Slow' },
      ],
      minAirTempC: 15,
      maxAirTempC: 35,
      maxRhPct: 80,
      dustFreeMinutes: 20,
      handleMinutes: 480,
      sandPolishMinutes: 960,
      bakeSchedules: [
        { objectTempC: 60, minutes: 30 },
        { objectTempC: 70, minutes: 15 },
      ],
      minCureTempC: 10,
      q10: 2,
      flashTable: [
        { tempC: 10, minutes: 15 },
        { tempC: 20, minutes: 8 },
        { tempC: 30, minutes: 5 },
      ],
    }),
  },
  {
    product: {
      name: 'Clear binder wet bed',
      category: 'wet_bed_binder',
      chemistry: 'waterborne',
      components: 1,
      notes: 'Invented demo product. One wet coat over the blend area; spray the basecoat into it while it is still wet.',
    },
    revision: completeRevision({
      refTempC: 20,
      flashMinMinutes: 2,
      flashMaxMinutes: 5,
      flashBeforeNextMinutes: 1,
      recoatWindowMinutes: 10,
      coats: 1,
      minAirTempC: 15,
      maxAirTempC: 35,
      minRhPct: 30,
      maxRhPct: 80,
      q10: 2,
      wbRefRhPct: 50,
      wbRefAirflowMps: 0.3,
      wbAirflowExponent: 0.5,
    }),
  },
]

/** Inserts the demo products with one revision each, inside the demo seed's transaction. */
export async function seedDemoSpecs(tx: Transaction<Database>): Promise<void> {
  for (const d of DEMO_PRODUCTS) {
    const product = await insertProduct(tx, { ...d.product, created_by: null })
    await appendEvent(tx, {
      type: 'spec.product.created',
      actor: SEED_ACTOR,
      subject: { type: 'product', id: product.id },
      data: { productId: product.id, name: product.name, category: product.category, chemistry: product.chemistry, components: product.components },
    })
    const revision = await insertRevision(tx, product.id, d.revision, { userId: null })
    await appendEvent(tx, {
      type: 'spec.revision.created',
      actor: SEED_ACTOR,
      subject: { type: 'spec_revision', id: revision.id },
      data: { revisionId: revision.id, productId: product.id, number: revision.number, fromRevisionId: null },
    })
  }
}
