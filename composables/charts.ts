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

/**
 * The markers as one invisible ECharts line series: `at` alone → a vertical line (markLine), `at` …
 * `until` → a shaded span (markArea), each labelled; markers with unreadable times are left out.
 */
export function buildMarkerSeries(markers: readonly ChartMarker[]) {
  const valid = markers.filter((m) => Number.isFinite(Date.parse(m.at)))
  const lines = valid.filter((m) => !m.until)
  const areas = valid.filter((m) => m.until && Number.isFinite(Date.parse(m.until)))
  return {
    type: 'line' as const,
    name: '__markers',
    data: [] as [number, number][],
    silent: true,
    tooltip: { show: false },
    markLine: {
      symbol: ['none', 'none'],
      animation: false,
      label: { show: true, position: 'insideEndTop' as const, formatter: '{b}', color: '#243336', fontSize: 11 },
      data: lines.map((m) => ({
        name: m.label,
        xAxis: Date.parse(m.at),
        lineStyle: { color: MARKER_STYLE[m.kind].line, type: MARKER_STYLE[m.kind].dash, width: 1.5 },
      })),
    },
    markArea: {
      silent: true,
      label: { show: true, position: 'insideTop' as const, color: '#243336', fontSize: 11 },
      data: areas.map((m) => [
        { name: m.label, xAxis: Date.parse(m.at), itemStyle: { color: MARKER_STYLE[m.kind].area } },
        { xAxis: Date.parse(m.until!) },
      ]),
    },
  }
}
