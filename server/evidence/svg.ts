// A small SVG → PDF converter for the charts echarts renders on the server (SVG renderer, ssr: true), so
// the report embeds them as vector graphics. It understands what echarts emits for line charts — <path>
// (with transform, fill, stroke, opacity, dash), <rect>, <text> (anchor, baseline, font size), <g>
// transforms — and skips <defs> (clip paths; the lines already lie inside the grid). Path data goes to
// pdfkit's own SVG path parser (doc.path), so arcs and curves need nothing here. parseSvg is pure;
// drawSvg paints the parsed shapes on a pdfkit document.

export type Matrix = [number, number, number, number, number, number]
export interface Paint {
  rgb: [number, number, number]
  alpha: number
}

export interface SvgPath {
  kind: 'path'
  d: string
  matrix: Matrix
  fill: Paint | null
  stroke: Paint | null
  strokeWidth: number
  dash: number[] | null
  lineCap: 'butt' | 'round' | 'square'
  lineJoin: 'miter' | 'round' | 'bevel'
}

export interface SvgText {
  kind: 'text'
  text: string
  x: number
  y: number
  matrix: Matrix
  anchor: 'start' | 'middle' | 'end'
  baseline: 'alphabetic' | 'middle' | 'hanging'
  size: number
  bold: boolean
  fill: Paint
}

export type SvgShape = SvgPath | SvgText

export interface ParsedSvg {
  width: number
  height: number
  shapes: SvgShape[]
}

const IDENTITY: Matrix = [1, 0, 0, 1, 0, 0]

export function multiply(m: Matrix, n: Matrix): Matrix {
  return [
    m[0] * n[0] + m[2] * n[1],
    m[1] * n[0] + m[3] * n[1],
    m[0] * n[2] + m[2] * n[3],
    m[1] * n[2] + m[3] * n[3],
    m[0] * n[4] + m[2] * n[5] + m[4],
    m[1] * n[4] + m[3] * n[5] + m[5],
  ]
}

/** An SVG transform list ("translate(10 20) rotate(-45)") as one matrix. Unknown parts are ignored. */
export function parseTransform(s: string | undefined): Matrix {
  let m: Matrix = IDENTITY
  if (!s) return m
  for (const [, fn, argText] of s.matchAll(/(\w+)\s*\(([^)]*)\)/g)) {
    const a = (argText ?? '').split(/[\s,]+/).filter(Boolean).map(Number)
    if (a.some((v) => !Number.isFinite(v))) continue
    let t: Matrix | null = null
    if (fn === 'translate') t = [1, 0, 0, 1, a[0] ?? 0, a[1] ?? 0]
    else if (fn === 'scale') t = [a[0] ?? 1, 0, 0, a[1] ?? a[0] ?? 1, 0, 0]
    else if (fn === 'matrix' && a.length === 6) t = a as Matrix
    else if (fn === 'rotate') {
      const r = ((a[0] ?? 0) * Math.PI) / 180
      const [cx, cy] = [a[1] ?? 0, a[2] ?? 0]
      const rot: Matrix = [Math.cos(r), Math.sin(r), -Math.sin(r), Math.cos(r), 0, 0]
      t = multiply(multiply([1, 0, 0, 1, cx, cy], rot), [1, 0, 0, 1, -cx, -cy])
    }
    if (t) m = multiply(m, t)
  }
  return m
}

const NAMED: Record<string, [number, number, number]> = {
  black: [0, 0, 0],
  white: [255, 255, 255],
  red: [255, 0, 0],
  green: [0, 128, 0],
  blue: [0, 0, 255],
  gray: [128, 128, 128],
  grey: [128, 128, 128],
}

/** A CSS colour (#rgb, #rrggbb, rgb(), rgba(), a few names) with an extra opacity; null for none / transparent. */
export function parsePaint(value: string | undefined, opacity = 1): Paint | null {
  if (value === undefined) return null
  const v = value.trim().toLowerCase()
  if (!v || v === 'none' || v === 'transparent') return null
  let rgb: [number, number, number] | null = null
  let alpha = 1
  let m: RegExpExecArray | null
  if ((m = /^#([0-9a-f]{3})$/.exec(v))) rgb = [...m[1]!].map((h) => parseInt(h + h, 16)) as [number, number, number]
  else if ((m = /^#([0-9a-f]{6})$/.exec(v))) rgb = [0, 2, 4].map((i) => parseInt(m![1]!.slice(i, i + 2), 16)) as [number, number, number]
  else if ((m = /^rgba?\(([^)]*)\)$/.exec(v))) {
    const p = m[1]!.split(/[\s,/]+/).filter(Boolean).map(Number)
    if (p.length >= 3 && p.slice(0, 3).every(Number.isFinite)) {
      rgb = [p[0]!, p[1]!, p[2]!]
      if (p.length >= 4 && Number.isFinite(p[3])) alpha = p[3]!
    }
  } else if (NAMED[v]) rgb = NAMED[v]
  if (!rgb) return null
  const a = Math.max(0, Math.min(1, alpha * opacity))
  return a > 0 ? { rgb, alpha: a } : null
}

function attrs(s: string): Record<string, string> {
  const out: Record<string, string> = {}
  for (const [, k, v] of s.matchAll(/([\w:-]+)\s*=\s*"([^"]*)"/g)) out[k!] = decodeEntities(v!)
  return out
}

/** `style="font-size:12px;font-family:…"` and `style="font: normal bold 12px sans-serif"` → size, bold. */
function fontOf(a: Record<string, string>): { size: number; bold: boolean } {
  const style = a.style ?? ''
  let size = Number.parseFloat(a['font-size'] ?? '') || 12
  let bold = a['font-weight'] === 'bold' || Number(a['font-weight']) >= 600
  const fs = /font-size\s*:\s*([\d.]+)px/.exec(style)
  if (fs) size = Number(fs[1])
  const shorthand = /(?:^|;)\s*font\s*:([^;]*)/.exec(style)
  if (shorthand) {
    const px = /([\d.]+)px/.exec(shorthand[1]!)
    if (px) size = Number(px[1])
    if (/\bbold\b|\b[6-9]00\b/.test(shorthand[1]!)) bold = true
  }
  if (/font-weight\s*:\s*(bold|[6-9]00)/.test(style)) bold = true
  return { size, bold }
}

export function decodeEntities(s: string): string {
  return s.replace(/&(#x[0-9a-f]+|#\d+|amp|lt|gt|quot|apos|nbsp);/gi, (_, e: string) => {
    const k = e.toLowerCase()
    if (k === 'amp') return '&'
    if (k === 'lt') return '<'
    if (k === 'gt') return '>'
    if (k === 'quot') return '"'
    if (k === 'apos') return "'"
    if (k === 'nbsp') return '\u00a0'
    const code = k.startsWith('#x') ? parseInt(k.slice(2), 16) : parseInt(k.slice(1), 10)
    return Number.isFinite(code) ? String.fromCodePoint(code) : ''
  })
}

const num = (v: string | undefined, d = 0) => {
  const n = Number.parseFloat(v ?? '')
  return Number.isFinite(n) ? n : d
}

function paintOf(a: Record<string, string>, which: 'fill' | 'stroke', inherited: Record<string, string>): Paint | null {
  const value = a[which] ?? inherited[which] ?? (which === 'fill' ? '#000' : undefined)
  const opacity = num(a[`${which}-opacity`] ?? inherited[`${which}-opacity`], 1) * num(a.opacity ?? inherited.opacity, 1)
  return parsePaint(value, opacity)
}

/** Shapes of an SVG document in paint order. */
export function parseSvg(svg: string): ParsedSvg {
  const root = /<svg\b([^>]*)>/.exec(svg)
  const rootAttrs = attrs(root?.[1] ?? '')
  const shapes: SvgShape[] = []
  const stack: { matrix: Matrix; inherited: Record<string, string> }[] = [{ matrix: IDENTITY, inherited: {} }]
  let defsDepth = 0
  const tagRe = /<(\/?)([\w:-]+)([^>]*?)(\/?)>|([^<]+)/g
  let openText: { a: Record<string, string>; matrix: Matrix; inherited: Record<string, string>; content: string } | null = null
  for (const m of svg.matchAll(tagRe)) {
    const [, closing, nameRaw, attrText, selfClosing, textContent] = m
    if (textContent !== undefined) {
      if (openText) openText.content += textContent
      continue
    }
    const name = nameRaw!.toLowerCase()
    const top = stack[stack.length - 1]!
    if (closing) {
      if (name === 'defs' || name === 'clippath') defsDepth = Math.max(0, defsDepth - 1)
      else if (name === 'g' && stack.length > 1) stack.pop()
      else if (name === 'text' && openText) {
        const t = openText
        openText = null
        const text = decodeEntities(t.content).replace(/\s+/g, ' ').trim()
        const fill = paintOf(t.a, 'fill', t.inherited)
        if (!text || !fill || defsDepth) continue
        const { size, bold } = fontOf(t.a)
        const anchor = t.a['text-anchor'] === 'middle' ? 'middle' : t.a['text-anchor'] === 'end' ? 'end' : 'start'
        const db = t.a['dominant-baseline'] ?? ''
        const baseline = db === 'central' || db === 'middle' ? 'middle' : db === 'hanging' || db === 'text-before-edge' ? 'hanging' : 'alphabetic'
        shapes.push({ kind: 'text', text, x: num(t.a.x), y: num(t.a.y), matrix: t.matrix, anchor, baseline, size, bold, fill })
      }
      continue
    }
    const a = attrs(attrText ?? '')
    if (name === 'defs' || name === 'clippath') {
      if (!selfClosing) defsDepth++
      continue
    }
    if (defsDepth) continue
    const matrix = multiply(top.matrix, parseTransform(a.transform))
    if (name === 'g') {
      if (!selfClosing) {
        const inherited = { ...top.inherited }
        for (const k of ['fill', 'stroke', 'opacity', 'fill-opacity', 'stroke-opacity', 'stroke-width']) if (a[k] !== undefined) inherited[k] = a[k]!
        stack.push({ matrix, inherited })
      }
      continue
    }
    if (name === 'text') {
      if (selfClosing) continue
      openText = { a, matrix, inherited: top.inherited, content: '' }
      continue
    }
    let d: string | null = null
    if (name === 'path') d = a.d ?? null
    else if (name === 'rect') {
      const [x, y, w, h] = [num(a.x), num(a.y), num(a.width), num(a.height)]
      if (w > 0 && h > 0) d = `M${x} ${y}h${w}v${h}h${-w}Z`
    } else if (name === 'line') d = `M${num(a.x1)} ${num(a.y1)}L${num(a.x2)} ${num(a.y2)}`
    else if (name === 'polyline' || name === 'polygon') {
      const p = (a.points ?? '').trim().split(/[\s,]+/).map(Number)
      if (p.length >= 4 && p.every(Number.isFinite)) {
        d = `M${p[0]} ${p[1]}` + Array.from({ length: p.length / 2 - 1 }, (_, i) => `L${p[2 * i + 2]} ${p[2 * i + 3]}`).join('') + (name === 'polygon' ? 'Z' : '')
      }
    } else if (name === 'circle') {
      const [cx, cy, r] = [num(a.cx), num(a.cy), num(a.r)]
      if (r > 0) d = `M${cx - r} ${cy}A${r} ${r} 0 1 0 ${cx + r} ${cy}A${r} ${r} 0 1 0 ${cx - r} ${cy}Z`
    }
    if (!d || !d.trim()) continue
    const fill = paintOf(a, 'fill', top.inherited)
    const strokeWidth = num(a['stroke-width'] ?? top.inherited['stroke-width'], 1)
    const stroke = strokeWidth > 0 ? paintOf(a, 'stroke', top.inherited) : null
    if (!fill && !stroke) continue
    const dashText = a['stroke-dasharray']
    const dash = dashText && dashText !== 'none' ? dashText.split(/[\s,]+/).map(Number).filter((x) => Number.isFinite(x) && x >= 0) : null
    const cap = a['stroke-linecap']
    const join = a['stroke-linejoin']
    shapes.push({
      kind: 'path',
      d,
      matrix,
      fill,
      stroke,
      strokeWidth,
      dash: dash && dash.some((x) => x > 0) ? dash : null,
      lineCap: cap === 'round' || cap === 'square' ? cap : 'butt',
      lineJoin: join === 'round' || join === 'bevel' ? join : 'miter',
    })
  }
  const viewBox = (rootAttrs.viewBox ?? '').split(/[\s,]+/).map(Number)
  return {
    width: num(rootAttrs.width, viewBox[2] ?? 0),
    height: num(rootAttrs.height, viewBox[3] ?? 0),
    shapes,
  }
}

/** The parts of a pdfkit document drawSvg uses (kept narrow so a test can pass a recorder). */
export interface PdfCanvas {
  x: number
  y: number
  save(): unknown
  restore(): unknown
  transform(a: number, b: number, c: number, d: number, e: number, f: number): unknown
  path(d: string): unknown
  fillColor(c: [number, number, number], opacity?: number): unknown
  strokeColor(c: [number, number, number], opacity?: number): unknown
  lineWidth(w: number): unknown
  lineCap(c: string): unknown
  lineJoin(j: string): unknown
  dash(length: number, opts?: { space?: number }): unknown
  undash(): unknown
  fill(): unknown
  stroke(): unknown
  fillAndStroke(): unknown
  font(name: string): unknown
  fontSize(size: number): unknown
  widthOfString(text: string): number
  text(text: string, x: number, y: number, options?: Record<string, unknown>): unknown
}

/** Paints a parsed SVG with its top-left corner at (x, y), `width` points wide (the height follows). */
export function drawSvg(doc: PdfCanvas, svg: ParsedSvg, x: number, y: number, width: number, fonts: { regular: string; bold: string }): void {
  const scale = svg.width > 0 ? width / svg.width : 1
  const [keepX, keepY] = [doc.x, doc.y]
  doc.save()
  doc.transform(scale, 0, 0, scale, x, y)
  for (const s of svg.shapes) {
    doc.save()
    doc.transform(...s.matrix)
    if (s.kind === 'path') {
      doc.path(s.d)
      if (s.fill) doc.fillColor(s.fill.rgb, s.fill.alpha)
      if (s.stroke) {
        doc.strokeColor(s.stroke.rgb, s.stroke.alpha)
        doc.lineWidth(s.strokeWidth)
        doc.lineCap(s.lineCap)
        doc.lineJoin(s.lineJoin)
        if (s.dash) doc.dash(s.dash[0]!, { space: s.dash[1] ?? s.dash[0]! })
        else doc.undash()
      }
      if (s.fill && s.stroke) doc.fillAndStroke()
      else if (s.fill) doc.fill()
      else doc.stroke()
    } else {
      doc.font(s.bold ? fonts.bold : fonts.regular)
      doc.fontSize(s.size)
      const w = doc.widthOfString(s.text)
      const dx = s.anchor === 'middle' ? w / 2 : s.anchor === 'end' ? w : 0
      doc.fillColor(s.fill.rgb, s.fill.alpha)
      doc.text(s.text, s.x - dx, s.y, { lineBreak: false, baseline: s.baseline })
    }
    doc.restore()
  }
  doc.restore()
  doc.x = keepX
  doc.y = keepY
}
