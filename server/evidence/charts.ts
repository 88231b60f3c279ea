import * as echarts from 'echarts/core'
import { LineChart } from 'echarts/charts'
import { GridComponent, LegendComponent, MarkAreaComponent } from 'echarts/components'
import { SVGRenderer } from 'echarts/renderers'
import type { ChartSpec } from './types'

// Charts of the report, rendered on the server: echarts with the SVG renderer in SSR mode, one SVG string
// per chart, which pdf.ts converts to vector paths (svg.ts). Times on the axis are UTC, like the report.

echarts.use([LineChart, GridComponent, LegendComponent, MarkAreaComponent, SVGRenderer])

// Print-friendly, distinguishable in greyscale by lightness (our own choice).
const PALETTE = ['#1d4ed8', '#b45309', '#047857', '#7c3aed', '#be123c', '#0f766e']

export const CHART_SIZE = { width: 720, height: 260 }

export function chartOption(spec: ChartSpec) {
  const [left, right] = spec.axes
  return {
    animation: false,
    useUTC: true,
    color: PALETTE,
    textStyle: { fontFamily: 'sans-serif', fontSize: 11 },
    grid: { left: 56, right: right ? 56 : 20, top: 28, bottom: 56 },
    legend: { bottom: 4, itemWidth: 18, itemHeight: 8, textStyle: { fontSize: 11 } },
    xAxis: {
      type: 'time',
      axisLabel: { fontSize: 10, hideOverlap: true },
      splitLine: { show: false },
    },
    yAxis: [
      { type: 'value', name: left, nameTextStyle: { fontSize: 10 }, scale: true, axisLabel: { fontSize: 10 }, splitLine: { lineStyle: { color: '#e5e7eb' } } },
      ...(right ? [{ type: 'value', name: right, nameTextStyle: { fontSize: 10 }, scale: true, axisLabel: { fontSize: 10 }, splitLine: { show: false } }] : []),
    ],
    series: spec.series.map((s, i) => ({
      type: 'line',
      name: `${s.name} (${s.unit})`,
      yAxisIndex: right ? s.axis : 0,
      showSymbol: false,
      connectNulls: false,
      lineStyle: { width: 1.2 },
      data: s.points,
      ...(i === 0 && spec.marks.length
        ? {
            markArea: {
              silent: true,
              itemStyle: { color: 'rgba(100, 116, 139, 0.16)' },
              label: { fontSize: 9, color: '#334155', position: 'insideTop' },
              data: spec.marks.map((m) => [{ name: m.label, xAxis: m.from }, { xAxis: m.to }]),
            },
          }
        : {}),
    })),
  }
}

/** One chart as an SVG document. */
export function renderChartSvg(spec: ChartSpec, size = CHART_SIZE): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: size.width, height: size.height })
  try {
    chart.setOption(chartOption(spec) as echarts.EChartsCoreOption)
    return chart.renderToSVGString()
  } finally {
    chart.dispose()
  }
}
