// Reading channels: wire name → column. One list so the validator, writer, rollups and exports agree.
export const CHANNELS = [
  { wire: 'airTempC', column: 'air_temp_c', unit: '°C', label: 'Air temperature' },
  { wire: 'rhPct', column: 'rh_pct', unit: '%', label: 'Relative humidity' },
  { wire: 'panelTempC', column: 'panel_temp_c', unit: '°C', label: 'Panel temperature' },
  { wire: 'airflowMps', column: 'airflow_mps', unit: 'm/s', label: 'Airflow' },
  { wire: 'boothDpPa', column: 'booth_dp_pa', unit: 'Pa', label: 'Booth pressure' },
  { wire: 'intakeFilterDpPa', column: 'intake_filter_dp_pa', unit: 'Pa', label: 'Intake filter pressure drop' },
  { wire: 'exhaustFilterDpPa', column: 'exhaust_filter_dp_pa', unit: 'Pa', label: 'Exhaust filter pressure drop' },
] as const

export type ChannelWire = (typeof CHANNELS)[number]['wire']
export type ChannelColumn = (typeof CHANNELS)[number]['column']

/** Channels with per-minute min / max / mean, the measured ones plus the derived dew point. */
export const ROLLUP_CHANNELS = [...CHANNELS.map((c) => c.column), 'dew_point_c'] as const
export type RollupChannel = (typeof ROLLUP_CHANNELS)[number]
