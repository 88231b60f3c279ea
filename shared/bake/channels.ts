// Reading channels a calibration may correct (the measured numeric ones; dew point is derived, heater is on/off).
export const CALIBRATED_CHANNELS = [
  'airTempC',
  'rhPct',
  'panelTempC',
  'airflowMps',
  'boothDpPa',
  'intakeFilterDpPa',
  'exhaustFilterDpPa',
] as const
export type CalibratedChannel = (typeof CALIBRATED_CHANNELS)[number]

/** Plain labels and SI units, for forms and history lines. */
export const CHANNEL_INFO: Record<CalibratedChannel, { label: string; unit: string; quantity: 'temperature' | 'humidity' | 'airflow' | 'pressure' }> = {
  airTempC: { label: 'Air temperature', unit: '°C', quantity: 'temperature' },
  rhPct: { label: 'Relative humidity', unit: '%', quantity: 'humidity' },
  panelTempC: { label: 'Panel temperature', unit: '°C', quantity: 'temperature' },
  airflowMps: { label: 'Airflow', unit: 'm/s', quantity: 'airflow' },
  boothDpPa: { label: 'Booth pressure', unit: 'Pa', quantity: 'pressure' },
  intakeFilterDpPa: { label: 'Intake filter pressure drop', unit: 'Pa', quantity: 'pressure' },
  exhaustFilterDpPa: { label: 'Exhaust filter pressure drop', unit: 'Pa', quantity: 'pressure' },
}

export function isCalibratedChannel(x: unknown): x is CalibratedChannel {
  return typeof x === 'string' && (CALIBRATED_CHANNELS as readonly string[]).includes(x)
}
