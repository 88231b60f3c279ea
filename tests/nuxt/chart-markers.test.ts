import { describe, expect, it } from 'vitest'
import { buildMarkerSeries, MARKER_STYLE } from '~/composables/charts'

describe('chart markers', () => {
  it('turns point markers into lines and spans into areas', () => {
    const s = buildMarkerSeries([
      { at: '2026-03-02T09:00:00Z', label: 'Clearcoat, coat 1', kind: 'coat' },
      { at: '2026-03-02T09:20:00Z', until: '2026-03-02T09:50:00Z', label: 'Bake 60 °C', kind: 'bake' },
      { at: '2026-03-02T09:55:00Z', label: 'Drift alert: humidity', kind: 'alert' },
      { at: 'not a time', label: 'broken', kind: 'coat' },
    ])
    expect(s.markLine.data).toEqual([
      { name: 'Clearcoat, coat 1', xAxis: Date.parse('2026-03-02T09:00:00Z'), lineStyle: { color: MARKER_STYLE.coat.line, type: 'solid', width: 1.5 } },
      { name: 'Drift alert: humidity', xAxis: Date.parse('2026-03-02T09:55:00Z'), lineStyle: { color: MARKER_STYLE.alert.line, type: 'dashed', width: 1.5 } },
    ])
    expect(s.markArea.data).toEqual([
      [
        { name: 'Bake 60 °C', xAxis: Date.parse('2026-03-02T09:20:00Z'), itemStyle: { color: MARKER_STYLE.bake.area } },
        { xAxis: Date.parse('2026-03-02T09:50:00Z') },
      ],
    ])
    expect(s.data).toEqual([])
  })
})
