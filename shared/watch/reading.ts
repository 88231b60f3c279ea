// What the watches see of one booth reading: its time, the booth mode and the channel values.

export const BOOTH_MODES = ['idle', 'spray', 'flash', 'bake', 'cool'] as const
export type BoothMode = (typeof BOOTH_MODES)[number]

// The measured channels use the wire names of the ingest (server/db/channels.ts); dewPointMarginC is derived
// upstream (surface temperature − dew point, DESIGN.md §6) and arrives on the reading like a measured one.
export const WATCH_CHANNELS = [
  'airTempC',
  'rhPct',
  'panelTempC',
  'airflowMps',
  'boothDpPa',
  'intakeFilterDpPa',
  'exhaustFilterDpPa',
  'dewPointMarginC',
] as const
export type WatchChannel = (typeof WATCH_CHANNELS)[number]

export type WatchReading = { t: number; mode?: BoothMode } & { [C in WatchChannel]?: number | null }

/** The channel's value, or null for "no data" (absent, null, NaN or ±Infinity). */
export function channelValue(reading: WatchReading, channel: WatchChannel): number | null {
  const v = reading[channel]
  return typeof v === 'number' && Number.isFinite(v) ? v : null
}

/** True when the reading carries data for any channel. */
export function hasAnyValue(reading: WatchReading): boolean {
  for (const c of WATCH_CHANNELS) if (channelValue(reading, c) !== null) return true
  return false
}

export function isBoothMode(v: unknown): v is BoothMode {
  return typeof v === 'string' && (BOOTH_MODES as readonly string[]).includes(v)
}

// Labels and units for messages. Same words as server/db/channels.ts for the measured channels.
export const CHANNEL_INFO: Record<WatchChannel, { label: string; unit: string; digits: number }> = {
  airTempC: { label: 'Air temperature', unit: '°C', digits: 1 },
  rhPct: { label: 'Relative humidity', unit: '%', digits: 1 },
  panelTempC: { label: 'Panel temperature', unit: '°C', digits: 1 },
  airflowMps: { label: 'Airflow', unit: 'm/s', digits: 2 },
  boothDpPa: { label: 'Booth pressure', unit: 'Pa', digits: 1 },
  intakeFilterDpPa: { label: 'Intake filter pressure drop', unit: 'Pa', digits: 0 },
  exhaustFilterDpPa: { label: 'Exhaust filter pressure drop', unit: 'Pa', digits: 0 },
  dewPointMarginC: { label: 'Dew-point margin', unit: '°C', digits: 1 },
}
