import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import { listActiveDevices, listBooths, type BoothRow } from '../repositories/booths'

// In-memory map from topic names to booths, so the ingest path does no query per message.
// Reloaded on a timer and, at most once a few seconds, when a message names a booth we do not know.
export interface BoothEntry extends BoothRow {
  deviceId: string | undefined
}

export class BoothDirectory {
  private byTopic = new Map<string, BoothEntry>()
  private byId = new Map<number, BoothEntry>()
  private lastLoad = 0
  private loading: Promise<void> | undefined

  constructor(private readonly db: Kysely<Database>) {}

  async load(): Promise<void> {
    this.loading ??= (async () => {
      try {
        const [booths, devices] = await Promise.all([listBooths(this.db), listActiveDevices(this.db)])
        const byTopic = new Map<string, BoothEntry>()
        const byId = new Map<number, BoothEntry>()
        for (const b of booths) {
          const entry = { ...b, deviceId: devices.find((d) => d.booth_id === b.id)?.id }
          byTopic.set(`${b.site_slug}/${b.slug}`, entry)
          byId.set(b.id, entry)
        }
        this.byTopic = byTopic
        this.byId = byId
        this.lastLoad = Date.now()
      } finally {
        this.loading = undefined
      }
    })()
    return this.loading
  }

  lookup(site: string, booth: string): BoothEntry | undefined {
    return this.byTopic.get(`${site}/${booth}`)
  }

  get(id: number): BoothEntry | undefined {
    return this.byId.get(id)
  }

  all(): BoothEntry[] {
    return [...this.byId.values()]
  }

  /** A booth we do not know: reload, but not more than every few seconds. */
  maybeReload(): void {
    if (Date.now() - this.lastLoad > 5_000) this.load().catch(() => undefined)
  }
}
