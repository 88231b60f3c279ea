import { describe, expect, it } from 'vitest'
import { renderChartSvg } from '../../../server/evidence/charts'
import { drawSvg, multiply, parsePaint, parseSvg, parseTransform, type PdfCanvas } from '../../../server/evidence/svg'
import { sampleReport } from './fixtures'

/** Records the calls drawSvg makes on a pdfkit document. */
function recorder() {
  const calls: [string, ...unknown[]][] = []
  const rec = new Proxy({ x: 10, y: 20 } as unknown as PdfCanvas, {
    get(target, prop: string) {
      if (prop === 'x' || prop === 'y') return (target as unknown as Record<string, number>)[prop]
      if (prop === 'widthOfString') return (s: string) => s.length * 5
      return (...args: unknown[]) => {
        calls.push([prop, ...args])
        return rec
      }
    },
    set(target, prop: string, v) {
      ;(target as unknown as Record<string, unknown>)[prop] = v
      return true
    },
  })
  return { rec, calls }
}

describe('SVG to PDF paths', () => {
  it('parses transforms and colours', () => {
    expect(parseTransform('translate(10 20)')).toEqual([1, 0, 0, 1, 10, 20])
    expect(parseTransform('translate(10,20) scale(2)')).toEqual([2, 0, 0, 2, 10, 20])
    const r = parseTransform('rotate(90)')
    expect(r.map((v) => Math.round(v * 1e9) / 1e9)).toEqual([0, 1, -1, 0, 0, 0])
    expect(multiply([1, 0, 0, 1, 5, 5], [2, 0, 0, 2, 1, 1])).toEqual([2, 0, 0, 2, 6, 6])
    expect(parsePaint('#5070dd')).toEqual({ rgb: [0x50, 0x70, 0xdd], alpha: 1 })
    expect(parsePaint('#fff')).toEqual({ rgb: [255, 255, 255], alpha: 1 })
    expect(parsePaint('rgba(100, 116, 139, 0.16)')).toEqual({ rgb: [100, 116, 139], alpha: 0.16 })
    expect(parsePaint('rgb(0,0,0)', 0)).toBeNull()
    expect(parsePaint('none')).toBeNull()
  })

  it('keeps the visible shapes of a hand-written SVG and skips defs and invisible ones', () => {
    const svg = parseSvg(`<svg width="100" height="50" viewBox="0 0 100 50">
      <defs><clipPath id="c"><path d="M0 0L1 1"/></clipPath></defs>
      <rect width="100" height="50" x="0" y="0" fill="none"></rect>
      <path d="M1 2L3 4" fill="none" stroke="#000" stroke-width="2" stroke-dasharray="4 2"></path>
      <path d="M0 0l5 0Z" fill="rgb(0,0,0)" fill-opacity="0" stroke="#ccc" stroke-width="0"></path>
      <g transform="translate(5 5)"><text x="1" y="2" text-anchor="end" dominant-baseline="central" style="font-size:9px" fill="#333">a &amp; b</text></g>
    </svg>`)
    expect(svg.width).toBe(100)
    expect(svg.shapes).toHaveLength(2)
    expect(svg.shapes[0]).toMatchObject({ kind: 'path', d: 'M1 2L3 4', strokeWidth: 2, dash: [4, 2], fill: null })
    expect(svg.shapes[1]).toMatchObject({ kind: 'text', text: 'a & b', anchor: 'end', baseline: 'middle', size: 9, matrix: [1, 0, 0, 1, 5, 5] })
  })

  it('turns an echarts SSR chart into stroked line paths and axis labels', () => {
    const chart = sampleReport().charts[0]!
    const svg = parseSvg(renderChartSvg(chart))
    const paths = svg.shapes.filter((s) => s.kind === 'path')
    const texts = svg.shapes.filter((s) => s.kind === 'text').map((s) => (s.kind === 'text' ? s.text : ''))
    // The data lines: long stroked paths with many segments.
    expect(paths.filter((s) => s.kind === 'path' && s.stroke && (s.d.match(/L/g)?.length ?? 0) > 50).length).toBeGreaterThanOrEqual(2)
    expect(texts).toContain('Air (°C)')
    expect(texts).toContain('08:30')
  })

  it('paints paths and text with the chart scaled into place, and puts the cursor back', () => {
    const { rec, calls } = recorder()
    const svg = parseSvg('<svg width="200" height="100"><path d="M0 0L10 10" stroke="#000" fill="none"/><text x="5" y="5" text-anchor="middle" fill="#000">hi</text></svg>')
    drawSvg(rec, svg, 50, 60, 100, { regular: 'R', bold: 'B' })
    expect(calls[1]).toEqual(['transform', 0.5, 0, 0, 0.5, 50, 60])
    expect(calls.some((c) => c[0] === 'path' && c[1] === 'M0 0L10 10')).toBe(true)
    expect(calls.some((c) => c[0] === 'stroke')).toBe(true)
    // "hi" is 10 wide (recorder), centred on x = 5.
    expect(calls.find((c) => c[0] === 'text')).toEqual(['text', 'hi', 0, 5, { lineBreak: false, baseline: 'alphabetic' }])
    expect([rec.x, rec.y]).toEqual([10, 20])
  })
})
