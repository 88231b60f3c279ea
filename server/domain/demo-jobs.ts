import type { Transaction } from 'kysely'
import type { Database } from '../db/database'
import type { Hasher } from './accounts'
import { appendEvent } from './event-log'
import { findUserByEmail, updateUser } from '../repositories/users'
import { insertJob, latestRevisionIdsByProductName, replaceSteps } from '../repositories/jobs'

// Invented demo repair orders (DESIGN.md §10) and the demo painter's booth-screen PIN.

/** The demo painter's PIN (painter@larkspur.example), for the demo data only. Documented, never printed. */
export const DEMO_PAINTER_PIN = '2468'

const SEED_ACTOR = { id: null, label: 'Demo seed' }

const PRIMER = '2K high-build primer surfacer'
const WET_BED = 'Clear binder wet bed'
const BASE = 'Waterborne basecoat, silver metallic'
const CLEAR = '2K high-solids clearcoat'

export const DEMO_JOBS = [
  {
    number: 'RO-24117',
    vehicle: 'Compact hatchback, rear quarter panel',
    colour_code: 'SLV-07',
    panels: ['left rear quarter panel', 'rear bumper cover (blend)'],
    notes: 'Invented demo job. Blend the basecoat into the rear door; clear the whole quarter.',
    booth: 'downdraft-1',
    steps: [
      { product: PRIMER, coats: 2, note: 'Over the filler repair only' },
      { product: WET_BED, coats: 1, note: 'Blend area' },
      { product: BASE, coats: 2, note: 'Second coat as a drop coat' },
      { product: CLEAR, coats: 2, note: '' },
    ],
  },
  {
    number: 'RO-24123',
    vehicle: 'Mid-size estate, front bumper cover',
    colour_code: 'SLV-07',
    panels: ['front bumper cover'],
    notes: 'Invented demo job. New primed bumper cover: scuff, then base and clear.',
    booth: null,
    steps: [
      { product: BASE, coats: 2, note: '' },
      { product: CLEAR, coats: 2, note: '' },
    ],
  },
] as const

/** Inside the demo seed's transaction, after the booths, users and demo products exist. */
export async function seedDemoJobs(tx: Transaction<Database>, hasher: Hasher): Promise<void> {
  const painter = await findUserByEmail(tx, 'painter@larkspur.example')
  if (painter) await updateUser(tx, painter.id, { pinHash: await hasher.hash(DEMO_PAINTER_PIN) })
  const revisions = await latestRevisionIdsByProductName(tx, [PRIMER, WET_BED, BASE, CLEAR])
  const booths = await tx.selectFrom('booths').select(['id', 'slug']).execute()
  for (const j of DEMO_JOBS) {
    const steps = j.steps.flatMap((s) => {
      const revisionId = revisions.get(s.product)
      return revisionId ? [{ revisionId, coatsPlanned: s.coats, note: s.note }] : []
    })
    const job = await insertJob(tx, {
      number: j.number,
      vehicle: j.vehicle,
      colour_code: j.colour_code,
      panels: [...j.panels],
      notes: j.notes,
      painter_id: painter?.id ?? null,
      booth_id: j.booth ? (booths.find((b) => b.slug === j.booth)?.id ?? null) : null,
      created_by: null,
    })
    const saved = await replaceSteps(tx, job.id, steps, [])
    await appendEvent(tx, {
      type: 'job.created',
      actor: SEED_ACTOR,
      subject: { type: 'job', id: job.id },
      data: {
        number: job.number,
        vehicle: job.vehicle,
        colourCode: job.colour_code,
        boothId: job.booth_id,
        painterId: job.painter_id,
        steps: saved.map((s) => ({ id: s.id, position: s.position, revisionId: s.revision_id, coatsPlanned: s.coats_planned })),
      },
    })
  }
}
