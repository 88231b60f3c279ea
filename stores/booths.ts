import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { apiFailure } from '~/composables/apiError'
import { useLiveStream } from '~/composables/useLiveStream'
import { useSessionStore } from '~/stores/session'

export type BoothMode = 'idle' | 'spray' | 'flash' | 'bake' | 'cool'
export type BoothKind = 'downdraft' | 'semi_downdraft' | 'crossdraft' | 'prep_deck'
export type DeviceStatus = 'online' | 'offline'

/** One reading as the API sends it: SI units, any channel may be null. */
export interface LiveReading {
  boothId: number
  ts: string
  receivedAt: string
  airTempC: number | null
  rhPct: number | null
  panelTempC: number | null
  airflowMps: number | null
  boothDpPa: number | null
  intakeFilterDpPa: number | null
  exhaustFilterDpPa: number | null
  heaterOn: boolean | null
  dewPointC: number | null
  dewPointMarginC: number | null
}

export interface Booth {
  id: number
  slug: string
  name: string
  kind: BoothKind | string
  hasHeater: boolean
  site: { id: number; slug: string; name: string }
  topic: string
  deviceId: string | null
  mode: BoothMode | null
  modeSince: string | null
  deviceStatus: DeviceStatus | null
  latest: LiveReading | null
  stale: boolean
}

/** `event: booth` of /api/live and /api/booths/:id/live. */
export interface LiveBoothEvent {
  boothId: number
  reading: LiveReading | null
  mode: BoothMode | null
  modeSince: string | null
  deviceStatus: DeviceStatus | null
  stale: boolean
  serverTime: string
}

/** `event: heartbeat`, every 10 s. */
export interface LiveHeartbeat {
  serverTime: string
  stale: number[]
}

export const HISTORY_CHANNELS = [
  'airTempC',
  'rhPct',
  'panelTempC',
  'airflowMps',
  'boothDpPa',
  'intakeFilterDpPa',
  'exhaustFilterDpPa',
  'dewPointC',
  'dewPointMarginC',
] as const
export type HistoryChannel = (typeof HISTORY_CHANNELS)[number]

/** GET /api/booths/:id/readings */
export interface BoothHistory {
  boothId: number
  from: string
  to: string
  resolution: 'raw' | 'raw-buckets' | 'minute-buckets'
  bucketSeconds: number
  count: number
  t: string[]
  series: Partial<Record<HistoryChannel, (number | null)[]>>
}

const MODES: readonly string[] = ['idle', 'spray', 'flash', 'bake', 'cool']
const asMode = (m: unknown): BoothMode | null => (typeof m === 'string' && MODES.includes(m) ? (m as BoothMode) : null)
const asStatus = (s: unknown): DeviceStatus | null => (s === 'online' || s === 'offline' ? s : null)

/**
 * Booth list plus live state from the all-booths SSE stream.
 *
 *   const booths = useBoothsStore()
 *   await booths.fetchBooths()       // GET /api/booths (SSR-safe, forwards the cookie)
 *   useLiveBooths()                  // in a component: live updates while it is mounted
 *   booths.list, booths.byId(3), booths.siteName, booths.connection
 *   booths.applyLive(event)          // merge a `booth` event from any stream
 */
export const useBoothsStore = defineStore('booths', () => {
  const booths = ref<Booth[]>([])
  const loaded = ref(false)
  const error = ref<string | null>(null)
  /** server clock − client clock, ms (from the last SSE message), for "x s ago" texts. */
  const clockOffsetMs = ref(0)
  /** Last time (client clock) each booth got a live update. */
  const updatedAt = ref<Record<number, number>>({})
  const request = useRequestFetch()
  const nuxtApp = useNuxtApp()

  const list = computed(() => [...booths.value].sort((a, b) => a.site.name.localeCompare(b.site.name) || a.name.localeCompare(b.name)))
  const sites = computed(() => {
    const seen = new Map<number, Booth['site']>()
    for (const b of booths.value) seen.set(b.site.id, b.site)
    return [...seen.values()]
  })
  /** The site's name when all booths belong to one site; "Name A · Name B" otherwise. */
  const siteName = computed(() => sites.value.map((s) => s.name).join(' · '))

  function byId(id: number): Booth | undefined {
    return booths.value.find((b) => b.id === id)
  }

  async function fetchBooths(): Promise<Booth[]> {
    try {
      const res = await request<{ booths: Booth[] }>('/api/booths')
      booths.value = res.booths.map((b) => ({ ...b, mode: asMode(b.mode), deviceStatus: asStatus(b.deviceStatus) }))
      loaded.value = true
      error.value = null
    } catch (e) {
      error.value = apiFailure(e).message
    }
    return booths.value
  }

  async function ensureLoaded(): Promise<Booth[]> {
    return loaded.value ? booths.value : fetchBooths()
  }

  function noteServerTime(iso: string | undefined) {
    const t = iso ? Date.parse(iso) : Number.NaN
    if (Number.isFinite(t)) clockOffsetMs.value = t - Date.now()
  }

  /** Merges one live state into the list. A reading older than the one held is ignored. */
  function applyLive(ev: LiveBoothEvent) {
    if (!ev || typeof ev.boothId !== 'number') return
    noteServerTime(ev.serverTime)
    const b = byId(ev.boothId)
    if (!b) {
      // A booth added after the list was read: fetch the list again (once).
      if (loaded.value) void fetchBooths()
      return
    }
    if (ev.reading && (!b.latest || Date.parse(ev.reading.ts) >= Date.parse(b.latest.ts) || Date.parse(ev.reading.receivedAt) > Date.parse(b.latest.receivedAt))) {
      b.latest = ev.reading
    }
    b.mode = asMode(ev.mode)
    b.modeSince = ev.modeSince ?? null
    b.deviceStatus = asStatus(ev.deviceStatus)
    b.stale = !!ev.stale
    updatedAt.value[b.id] = Date.now()
  }

  /** Heartbeat: `stale` lists the stale booths among those the stream covers (`scope`: all when left out). */
  function applyHeartbeat(hb: LiveHeartbeat, scope?: number[]) {
    if (!hb || !Array.isArray(hb.stale)) return
    noteServerTime(hb.serverTime)
    const stale = new Set(hb.stale)
    for (const b of booths.value) if (!scope || scope.includes(b.id)) b.stale = stale.has(b.id)
  }

  /** GET /api/booths/:id/readings for a range (≤ 3000 points per channel, SI units). */
  function fetchHistory(id: number, from: Date, to: Date): Promise<BoothHistory> {
    return request<BoothHistory>(`/api/booths/${id}/readings`, { query: { from: from.toISOString(), to: to.toISOString() } })
  }

  // One all-booths stream for the app, held open while any component retains it.
  let holders = 0
  const stream = useLiveStream(
    '/api/live',
    {
      booth: (d) => applyLive(d as LiveBoothEvent),
      heartbeat: (d) => applyHeartbeat(d as LiveHeartbeat),
    },
    {
      immediate: false,
      // Repeated failures may mean the session ended: ask, and go to sign-in if so.
      onError: (failures) => {
        if (failures % 3 !== 0) return
        const session = useSessionStore()
        void session.fetchMe().then(() => {
          if (session.loaded && !session.user) {
            stream.close()
            void nuxtApp.runWithContext(() => navigateTo('/login'))
          }
        })
      },
    },
  )
  const connection = computed(() => stream.state.value)

  function retain() {
    holders += 1
    if (holders === 1) stream.open()
  }

  function release() {
    holders = Math.max(0, holders - 1)
    if (holders === 0) stream.close()
  }

  function clear() {
    booths.value = []
    loaded.value = false
    updatedAt.value = {}
  }

  return {
    booths,
    loaded,
    error,
    clockOffsetMs,
    updatedAt,
    list,
    sites,
    siteName,
    connection,
    byId,
    fetchBooths,
    ensureLoaded,
    applyLive,
    applyHeartbeat,
    fetchHistory,
    retain,
    release,
    clear,
  }
})
