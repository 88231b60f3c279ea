import { EventEmitter } from 'node:events'
import { dewPointMarginC } from '#shared/cure/psychrometrics'
import type { ReadingRow } from './reading-row'
import { calibrateReadingRow } from '../domain/calibration'

// Latest state per booth for screens, fanned out at most twice a second per booth (the last value
// always arrives: a trailing update is scheduled when one is held back).

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
  /** Surface (panel, else air) temperature minus dew point, °C. */
  dewPointMarginC: number | null
}

export interface LiveBoothState {
  boothId: number
  reading: LiveReading | null
  mode: string | null
  modeSince: string | null
  deviceStatus: string | null
}

const MIN_INTERVAL_MS = 500

export function toLiveReading(raw: ReadingRow): LiveReading {
  // Sensor calibration offsets apply at read time (server/domain/calibration.ts); the stored row stays raw.
  const r = calibrateReadingRow(raw)
  const surface = r.panelTempC ?? r.airTempC
  const margin = surface !== null && r.dewPointC !== null ? dewPointMarginC(surface, r.dewPointC) : null
  return {
    boothId: r.boothId,
    ts: new Date(r.tsMs).toISOString(),
    receivedAt: new Date(r.receivedMs).toISOString(),
    airTempC: r.airTempC,
    rhPct: r.rhPct,
    panelTempC: r.panelTempC,
    airflowMps: r.airflowMps,
    boothDpPa: r.boothDpPa,
    intakeFilterDpPa: r.intakeFilterDpPa,
    exhaustFilterDpPa: r.exhaustFilterDpPa,
    heaterOn: r.heaterOn,
    dewPointC: r.dewPointC,
    dewPointMarginC: margin !== null && Number.isFinite(margin) ? Math.round(margin * 100) / 100 : null,
  }
}

export class LiveHub {
  private readonly emitter = new EventEmitter()
  private readonly states = new Map<number, LiveBoothState>()
  private readonly lastSent = new Map<number, number>()
  private readonly pending = new Map<number, NodeJS.Timeout>()

  constructor() {
    this.emitter.setMaxListeners(0)
  }

  private state(boothId: number): LiveBoothState {
    let s = this.states.get(boothId)
    if (!s) {
      s = { boothId, reading: null, mode: null, modeSince: null, deviceStatus: null }
      this.states.set(boothId, s)
    }
    return s
  }

  /** Seeds the latest state (from the database at start-up) without notifying. */
  prime(state: LiveBoothState): void {
    this.states.set(state.boothId, state)
  }

  reading(row: ReadingRow): void {
    const s = this.state(row.boothId)
    // An out-of-order (older) reading never replaces a newer one on screen.
    if (s.reading && Date.parse(s.reading.ts) > row.tsMs) return
    s.reading = toLiveReading(row)
    this.notify(row.boothId)
  }

  mode(boothId: number, mode: string, atIso: string): void {
    const s = this.state(boothId)
    s.mode = mode
    s.modeSince = atIso
    this.notify(boothId, true)
  }

  deviceStatus(boothId: number, status: string): void {
    this.state(boothId).deviceStatus = status
    this.notify(boothId, true)
  }

  get(boothId: number): LiveBoothState | undefined {
    return this.states.get(boothId)
  }

  all(): LiveBoothState[] {
    return [...this.states.values()]
  }

  private notify(boothId: number, now = false): void {
    const since = Date.now() - (this.lastSent.get(boothId) ?? 0)
    if (now || since >= MIN_INTERVAL_MS) {
      const t = this.pending.get(boothId)
      if (t) clearTimeout(t)
      this.pending.delete(boothId)
      this.emit(boothId)
    } else if (!this.pending.has(boothId)) {
      this.pending.set(
        boothId,
        setTimeout(() => {
          this.pending.delete(boothId)
          this.emit(boothId)
        }, MIN_INTERVAL_MS - since),
      )
    }
  }

  private emit(boothId: number): void {
    this.lastSent.set(boothId, Date.now())
    this.emitter.emit('update', this.states.get(boothId))
  }

  /** Listens to one booth, or to all when boothId is null. Returns the unsubscribe function. */
  subscribe(boothId: number | null, listener: (s: LiveBoothState) => void): () => void {
    const fn = (s: LiveBoothState) => {
      if (boothId === null || s.boothId === boothId) listener(s)
    }
    this.emitter.on('update', fn)
    return () => this.emitter.off('update', fn)
  }

  close(): void {
    for (const t of this.pending.values()) clearTimeout(t)
    this.pending.clear()
    this.emitter.removeAllListeners()
  }
}
