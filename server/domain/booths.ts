import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import { listActiveDevices, listBooths } from '../repositories/booths'
import { telemetry } from '../telemetry/runtime'
import { loadLatestStates } from '../telemetry/latest'
import { boothTopic } from '../telemetry/wire'

/** Staleness: a booth whose last reading is older than this shows as stale on screens. */
export const STALE_AFTER_MS = 30_000

export async function listBoothsWithLatest(db: Kysely<Database>) {
  const [booths, devices] = await Promise.all([listBooths(db), listActiveDevices(db)])
  const t = telemetry()
  const states = t ? null : await loadLatestStates(db)
  return booths.map((b) => {
    const st = t ? t.live.get(b.id) : states?.find((s) => s.boothId === b.id)
    const reading = st?.reading ?? null
    return {
      id: b.id,
      slug: b.slug,
      name: b.name,
      kind: b.kind,
      hasHeater: b.has_heater,
      site: { id: b.site_id, slug: b.site_slug, name: b.site_name },
      topic: boothTopic(b.site_slug, b.slug, 'reading'),
      deviceId: devices.find((d) => d.booth_id === b.id)?.id ?? null,
      mode: st?.mode ?? null,
      modeSince: st?.modeSince ?? null,
      deviceStatus: st?.deviceStatus ?? null,
      latest: reading,
      stale: !reading || Date.now() - Date.parse(reading.receivedAt) > STALE_AFTER_MS,
    }
  })
}
