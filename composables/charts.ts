// Shapes the time-series chart takes (components/charts/TimeSeriesChart.vue).

/** A vertical line (`at` only) or a shaded span (`at` … `until`) on a chart's time axis. */
export interface ChartMarker {
  at: string
  until?: string
  label: string
  kind: 'coat' | 'bake' | 'alert'
}

export interface ChartSeries {
  name: string
  /** [epoch ms, value in display units | null (gap)] */
  data: [number, number | null][]
  color?: string
  dashed?: boolean
}

/** Line colours for charts (graphics contrast ≥ 3:1 on white). */
export const CHART_COLORS = {
  brand: '#146863',
  warm: '#b0570a',
  ink: '#4f5a63',
  violet: '#6a4c9c',
  blue: '#2f5f9e',
} as const

export const MARKER_STYLE: Record<ChartMarker['kind'], { line: string; area: string; dash: 'solid' | 'dashed' }> = {
  coat: { line: '#105450', area: 'rgba(20, 104, 99, 0.10)', dash: 'solid' },
  bake: { line: '#8a4b00', area: 'rgba(246, 183, 74, 0.20)', dash: 'solid' },
  alert: { line: '#b0241b', area: 'rgba(176, 36, 27, 0.10)', dash: 'dashed' },
}
