import type { Kysely } from 'kysely'
import type { BoothKind, Database, Role } from '../db/database'
import type { ServerSettings } from '../config'
import type { Hasher } from './accounts'
import { seedDemoSpecs } from './demo-specs'
import { seedDemoJobs } from './demo-jobs'

// The invented demo shop (DESIGN.md §10). Everything here is made up for the demo.
export const DEMO_SITE = { slug: 'larkspur', name: 'Larkspur Collision & Refinish', time_zone: 'UTC' }

export const DEMO_BOOTHS: { slug: string; name: string; kind: BoothKind; has_heater: boolean }[] = [
  { slug: 'downdraft-1', name: 'Downdraft booth 1', kind: 'downdraft', has_heater: true },
  { slug: 'downdraft-2', name: 'Downdraft booth 2', kind: 'downdraft', has_heater: true },
  { slug: 'prep-deck', name: 'Prep deck', kind: 'prep_deck', has_heater: false },
]

export const DEMO_USERS: { local: string; name: string; role: Role }[] = [
  { local: 'admin', name: 'Morgan Ashdown', role: 'admin' },
  { local: 'manager', name: 'Priya Fenwick', role: 'manager' },
  { local: 'tech', name: 'Tomas Reedley', role: 'tech' },
  { local: 'painter', name: 'Jun Halloway', role: 'painter' },
  { local: 'auditor', name: 'Odette Brackwater', role: 'auditor' },
]

export const demoDeviceId = (boothSlug: string) => `${DEMO_SITE.slug}-${boothSlug}`

/** Idempotent: an existing demo site is left as it is. */
export async function seedDemo(db: Kysely<Database>, hasher: Hasher, s: ServerSettings): Promise<void> {
  if (!s.DEMO_PASSWORD || !s.DEMO_DEVICE_PASSWORD) {
    throw new Error('DEMO_SEED=1 needs DEMO_PASSWORD and DEMO_DEVICE_PASSWORD (the demo start sets both)')
  }
  const existing = await db.selectFrom('sites').select('id').where('slug', '=', DEMO_SITE.slug).executeTakeFirst()
  if (existing) return
  const passwordHash = await hasher.hash(s.DEMO_PASSWORD)
  const deviceHash = await hasher.hash(s.DEMO_DEVICE_PASSWORD)
  await db.transaction().execute(async (tx) => {
    const site = await tx.insertInto('sites').values(DEMO_SITE).returning('id').executeTakeFirstOrThrow()
    for (const b of DEMO_BOOTHS) {
      const booth = await tx
        .insertInto('booths')
        .values({ ...b, site_id: site.id })
        .returning('id')
        .executeTakeFirstOrThrow()
      await tx.insertInto('devices').values({ id: demoDeviceId(b.slug), booth_id: booth.id, secret_hash: deviceHash }).execute()
    }
    for (const u of DEMO_USERS) {
      await tx
        .insertInto('users')
        .values({ email: `${u.local}@larkspur.example`, name: u.name, role: u.role, password_hash: passwordHash })
        .onConflict((oc) => oc.column('email').doNothing())
        .execute()
    }
    await seedDemoSpecs(tx)
    await seedDemoJobs(tx, hasher)
  })
  console.log('[seed] demo shop created')
}
