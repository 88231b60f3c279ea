// Why a result is flagged: stable codes so the UI can word them (and translate them) itself.

/** Codes carried in the `reasons` list of flash, pot-life and cure-credit results. */
export type EstimateReason =
  /** The spec, times or options were unusable: every number in the result is NaN / null. */
  | 'invalid-input'
  /** Part of the interval had no usable reading (gap longer than the hold, or out-of-range values). */
  | 'data-gap'
  /** No usable reading at "now": no projection from the current rate is possible. */
  | 'no-current-reading'
  /** The current rate is zero (e.g. 100 % RH for a waterborne flash): the projection is open-ended. */
  | 'no-progress-now'
  /** Airflow was missing: the reference air velocity was assumed. */
  | 'airflow-assumed'
  /** A temperature table was given for a waterborne flash, where the rate comes from VPD instead. */
  | 'table-ignored'
  /** Panel temperature came from the heat-up lag on air temperature, not from a panel sensor. */
  | 'panel-estimated'
  /** The panel is below the spec's minimum cure temperature now: no credit accrues. */
  | 'below-min-cure-now'
  /** Pot life: time without readings was counted at a conservative rate rather than not at all. */
  | 'gap-counted-conservatively'
