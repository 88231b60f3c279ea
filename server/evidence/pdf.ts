import PDFDocument from 'pdfkit'
import { CHART_SIZE, renderChartSvg } from './charts'
import { drawSvg, parseSvg, type PdfCanvas } from './svg'
import type { ConditionStats, EvidenceReport, Range } from './types'
import { countVerdicts, num1, VERDICT_LABELS } from './verdict'

// The report as a PDF (pdfkit): title block, numbered sections, tables that break across pages with their
// header repeated, charts as vector graphics, and on every page the page number, when and by whom it was
// generated. Pure: the report model in, a pdfkit document (a readable stream of the PDF bytes) out.
//
// Fonts: Liberation Sans (SIL Open Font License), as TrueType bytes passed in by the caller. Without them
// the PDF falls back to pdfkit's built-in Helvetica, which only encodes WinAnsi: the few symbols outside
// it (→ ≥ −) are then written as ASCII.

export interface PdfFonts {
  regular: Uint8Array
  bold: Uint8Array
}

const A4 = { width: 595.28, height: 841.89 }
const MARGIN = { top: 60, bottom: 60, left: 48, right: 48 }
const CONTENT_W = A4.width - MARGIN.left - MARGIN.right
const INK: [number, number, number] = [17, 24, 39]
const MUTED: [number, number, number] = [75, 85, 99]
const RULE: [number, number, number] = [209, 213, 219]
const HEAD_BG: [number, number, number] = [241, 245, 249]

type Doc = PDFKit.PDFDocument

interface Ctx {
  doc: Doc
  regular: string
  bold: string
  t: (s: string) => string
}

const WINANSI_FALLBACK: [RegExp, string][] = [
  [/→/g, '->'],
  [/≥/g, '>='],
  [/≤/g, '<='],
  [/[−–—]/g, '-'],
  [/[“”]/g, '"'],
  [/[‘’]/g, "'"],
  [/…/g, '...'],
  [/₂/g, '2'],
]

export const when = (iso: string | null | undefined) => (iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)}` : '—')
const hhmm = (iso: string) => iso.slice(11, 16)

function rangeText(r: Range | null, digits = 1): string {
  if (!r) return '—'
  const f = (v: number) => (digits === 0 ? String(Math.round(v)) : v.toFixed(digits))
  return `${f(r.min)} / ${f(r.mean)} / ${f(r.max)}`
}

// ── layout helpers ─────────────────────────────────────────────────────────────────────────────────

function bottom(doc: Doc) {
  return doc.page.height - doc.page.margins.bottom
}

function ensureSpace(c: Ctx, h: number) {
  if (c.doc.y + h > bottom(c.doc)) c.doc.addPage()
}

function heading(c: Ctx, text: string) {
  const { doc } = c
  ensureSpace(c, 60)
  doc.moveDown(0.8)
  doc.font(c.bold).fontSize(14).fillColor(INK).text(c.t(text), MARGIN.left, doc.y, { width: CONTENT_W })
  const y = doc.y + 2
  doc.moveTo(MARGIN.left, y).lineTo(MARGIN.left + CONTENT_W, y).lineWidth(0.6).strokeColor(RULE).stroke()
  doc.y = y + 6
}

function subheading(c: Ctx, text: string) {
  ensureSpace(c, 40)
  c.doc.moveDown(0.4)
  c.doc.font(c.bold).fontSize(10.5).fillColor(INK).text(c.t(text), MARGIN.left, c.doc.y, { width: CONTENT_W })
  c.doc.moveDown(0.2)
}

function para(c: Ctx, text: string, opts: { size?: number; color?: [number, number, number]; bold?: boolean } = {}) {
  const { doc } = c
  const size = opts.size ?? 9.5
  doc.font(opts.bold ? c.bold : c.regular).fontSize(size)
  ensureSpace(c, doc.heightOfString(c.t(text), { width: CONTENT_W }) + 2)
  doc.fillColor(opts.color ?? INK).text(c.t(text), MARGIN.left, doc.y, { width: CONTENT_W })
  doc.moveDown(0.25)
}

function noRecords(c: Ctx, report: EvidenceReport, section: string, what = 'No records.') {
  const note = report.notes.find((n) => n.section === section)
  para(c, note ? `No records: ${note.note}` : what, { color: MUTED })
}

/** Label / value pairs in two columns. */
function keyValues(c: Ctx, pairs: [string, string][], labelW = 130) {
  const { doc } = c
  for (const [k, v] of pairs) {
    doc.font(c.regular).fontSize(9.5)
    const h = Math.max(doc.heightOfString(c.t(v), { width: CONTENT_W - labelW }), 12)
    ensureSpace(c, h + 2)
    const y = doc.y
    doc.font(c.bold).fillColor(MUTED).text(c.t(k), MARGIN.left, y, { width: labelW - 8 })
    doc.font(c.regular).fillColor(INK).text(c.t(v), MARGIN.left + labelW, y, { width: CONTENT_W - labelW })
    doc.y = Math.max(doc.y, y + h) + 2
  }
}

interface Column {
  header: string
  /** Share of the content width. */
  w: number
  align?: 'left' | 'right' | 'center'
  size?: number
}

/** A table: wraps cells, breaks across pages with the header row repeated. */
function table(c: Ctx, columns: Column[], rows: string[][], opts: { size?: number } = {}) {
  const { doc } = c
  const size = opts.size ?? 8.5
  const pad = 3
  const total = columns.reduce((a, col) => a + col.w, 0)
  const widths = columns.map((col) => (col.w / total) * CONTENT_W)
  const xs = widths.map((_, i) => MARGIN.left + widths.slice(0, i).reduce((a, b) => a + b, 0))
  const sizeOf = (i: number, header: boolean) => (header ? size : (columns[i]!.size ?? size))
  const cellH = (text: string, i: number, font: string, header: boolean) => {
    doc.font(font).fontSize(sizeOf(i, header))
    return doc.heightOfString(c.t(text), { width: widths[i]! - 2 * pad })
  }
  const drawRow = (cells: string[], header: boolean) => {
    const font = header ? c.bold : c.regular
    const h = Math.max(...cells.map((t, i) => cellH(t, i, font, header)), size) + 2 * pad
    if (doc.y + h > bottom(doc)) {
      doc.addPage()
      if (!header) drawRow(columns.map((col) => col.header), true)
    }
    const y = doc.y
    if (header) doc.rect(MARGIN.left, y, CONTENT_W, h).fillColor(HEAD_BG).fill()
    cells.forEach((text, i) => {
      doc.font(font).fontSize(sizeOf(i, header)).fillColor(INK)
      doc.text(c.t(text), xs[i]! + pad, y + pad, { width: widths[i]! - 2 * pad, align: columns[i]!.align ?? 'left' })
    })
    doc.moveTo(MARGIN.left, y + h).lineTo(MARGIN.left + CONTENT_W, y + h).lineWidth(0.4).strokeColor(RULE).stroke()
    doc.x = MARGIN.left
    doc.y = y + h
  }
  ensureSpace(c, 40)
  drawRow(columns.map((col) => col.header), true)
  for (const r of rows) drawRow(r.map((x) => (x.length > 700 ? `${x.slice(0, 699)}…` : x)), false)
  doc.moveDown(0.5)
}

// ── sections ───────────────────────────────────────────────────────────────────────────────────────

function titleBlock(c: Ctx, r: EvidenceReport) {
  const { doc } = c
  doc.font(c.bold).fontSize(22).fillColor(INK).text(c.t('Evidence pack'), MARGIN.left, MARGIN.top, { width: CONTENT_W })
  doc.font(c.regular).fontSize(13).fillColor(MUTED).text(c.t(r.title), { width: CONTENT_W })
  doc.moveDown(0.8)
  const chain = r.chain.head
    ? `seq ${r.chain.head.seq}, ${r.chain.head.hash} — ${r.chain.verified ? `verified intact (${r.chain.count} events)` : `NOT intact: first broken link at seq ${r.chain.brokenAt} (${r.chain.reason})`}`
    : r.chain.verified
      ? 'empty (no events yet)'
      : `NOT intact: first broken link at seq ${r.chain.brokenAt} (${r.chain.reason})`
  const verdicts = Object.entries(countVerdicts(r))
    .map(([k, n]) => `${VERDICT_LABELS[k as keyof typeof VERDICT_LABELS]}: ${n}`)
    .join(' · ')
  keyValues(c, [
    ['Covers', r.scope.kind === 'job' ? `Repair order ${r.scope.jobNumber}` : `Booth ${r.booths.map((b) => b.name).join(', ')}`],
    ['Booths', r.booths.map((b) => `${b.name} (${b.slug})`).join(', ') || '—'],
    ['Period (UTC)', `${when(r.period.from)} to ${when(r.period.to)}`],
    ['Generated', `${when(r.generatedAt)} UTC`],
    ['Generated by', `${r.generatedBy.name} (${r.generatedBy.role})`],
    ['Export id', r.exportId],
    ['Coats', `${r.coats.length}${verdicts ? ` — ${verdicts}` : ''}`],
    ['Readings', `${r.coverage.rows.toLocaleString('en-US')} stored (${Math.round(r.coverage.ratio * 1000) / 10} % of one per second)`],
    ['Event log chain head', chain],
    ['Units', r.units],
  ])
}

function jobSection(c: Ctx, r: EvidenceReport) {
  heading(c, '1. Job and vehicle')
  if (!r.jobs.length) return noRecords(c, r, 'jobs', 'No job had a coat in this booth during the period.')
  if (r.scope.kind === 'job' && r.jobs.length === 1) {
    const j = r.jobs[0]!
    keyValues(c, [
      ['Repair order', j.number],
      ['Vehicle', j.vehicle],
      ['Colour code', j.colourCode || '—'],
      ['Panels', j.panels.join(', ') || '—'],
      ['Status', j.status],
      ['Painter', j.painter ?? '—'],
      ['Booth', j.booth ?? '—'],
      ['Opened', `${when(j.createdAt)} UTC`],
      ['Notes', j.notes || '—'],
    ])
    return
  }
  table(
    c,
    [
      { header: 'Repair order', w: 16 },
      { header: 'Vehicle', w: 34 },
      { header: 'Colour', w: 14 },
      { header: 'Panels', w: 24 },
      { header: 'Status', w: 12 },
    ],
    r.jobs.map((j) => [j.number, j.vehicle, j.colourCode || '—', j.panels.join(', ') || '—', j.status]),
  )
}

function planSection(c: Ctx, r: EvidenceReport) {
  heading(c, '2. Finish plan')
  if (!r.plan.length) return noRecords(c, r, 'plan')
  const multi = new Set(r.plan.map((p) => p.jobNumber)).size > 1
  table(
    c,
    [
      ...(multi ? [{ header: 'Repair order', w: 14 }] : []),
      { header: 'Step', w: 6, align: 'right' as const },
      { header: 'Product (spec revision)', w: 40 },
      { header: 'Coats planned', w: 10, align: 'right' as const },
      { header: 'Coats sprayed', w: 10, align: 'right' as const },
      { header: 'Note', w: 24 },
    ],
    r.plan.map((p) => [
      ...(multi ? [p.jobNumber] : []),
      String(p.position),
      `${p.product}${p.revisionNumber !== null ? ` (rev. ${p.revisionNumber})` : ''}`,
      String(p.coatsPlanned),
      String(p.coatsDone),
      p.note || '',
    ]),
  )
}

const coatLabel = (coat: EvidenceReport['coats'][number], multi: boolean) =>
  `${multi ? `${coat.jobNumber} ` : ''}${coat.stepPosition ?? '?'}.${coat.coatNumber}`

function statsRow(label: string, span: string, s: ConditionStats): string[] {
  return [label, span, String(s.n), rangeText(s.airTempC), rangeText(s.rhPct, 0), rangeText(s.dewPointMarginC), rangeText(s.airflowMps, 2)]
}

function coatSection(c: Ctx, r: EvidenceReport) {
  heading(c, '3. Coats')
  if (!r.coats.length) return noRecords(c, r, 'coats')
  const multi = new Set(r.coats.map((x) => x.jobNumber)).size > 1
  para(c, 'Coat = step.coat of the finish plan. Waited = next coat start − this coat finish. Needed = the flash the data sheet requires at the measured conditions (cure engine).', {
    size: 8.5,
    color: MUTED,
  })
  table(
    c,
    [
      { header: 'Coat', w: multi ? 11 : 6 },
      { header: 'Product', w: 25 },
      { header: 'Booth', w: 13 },
      { header: 'Start (UTC)', w: 14 },
      { header: 'Finish', w: 8 },
      { header: 'Waited min', w: 8, align: 'right' },
      { header: 'Needed min', w: 8, align: 'right' },
      { header: 'Verdict', w: 18 },
    ],
    r.coats.map((x) => [
      coatLabel(x, multi),
      x.product,
      x.boothName,
      when(x.startedAt),
      x.finishedAt ? hhmm(x.finishedAt) : '—',
      x.flash ? num1(x.flash.waitedMinutes) : '—',
      x.flash ? num1(x.flash.requiredMinutes) : '—',
      VERDICT_LABELS[x.verdict.code],
    ]),
  )

  subheading(c, 'Conditions during each coat and its flash')
  para(c, 'min / mean / max of the calibrated readings. Dew-point margin = surface (panel, else air) temperature − dew point.', { size: 8.5, color: MUTED })
  const rows: string[][] = []
  for (const x of r.coats) {
    rows.push(statsRow(`${coatLabel(x, multi)} spray`, `${hhmm(x.startedAt)}–${x.finishedAt ? hhmm(x.finishedAt) : '…'}`, x.during))
    if (x.flash) rows.push(statsRow(`${coatLabel(x, multi)} flash`, `${hhmm(x.flash.from)}–${hhmm(x.flash.to)}`, x.flash.stats))
  }
  table(
    c,
    [
      { header: 'Coat', w: multi ? 14 : 10 },
      { header: 'Span', w: 11 },
      { header: 'Readings', w: 8, align: 'right' },
      { header: 'Air °C', w: 17 },
      { header: 'RH %', w: 13 },
      { header: 'Dew-point margin °C', w: 17 },
      { header: 'Airflow m/s', w: 17 },
    ],
    rows,
    { size: 8 },
  )

  subheading(c, 'Verdicts')
  for (const x of r.coats) {
    const spec = x.flash ? ` Data sheet: ${num1(x.flash.specMinMinutes)}${x.flash.specMaxMinutes !== x.flash.specMinMinutes ? `–${num1(x.flash.specMaxMinutes)}` : ''} min at ${num1(x.flash.refTempC)} °C (${x.flash.kind === 'between_coats' ? 'between coats' : 'before the next product'}).` : ''
    const recorded = x.flash?.recordedProgress !== null && x.flash?.recordedProgress !== undefined ? ` At the next start the booth screen showed ${Math.floor(x.flash.recordedProgress * 100)} % flash.` : ''
    para(c, `Coat ${coatLabel(x, multi)} — ${x.product}: ${VERDICT_LABELS[x.verdict.code]} — ${x.verdict.reason}.${spec}${recorded}`, { size: 9 })
    for (const o of x.overrides) para(c, `   Guard rail passed at start (${o.kind.replace(/_/g, ' ')}): ${o.detail} Reason given: "${o.reason}"`, { size: 8.5, color: MUTED })
  }
}

function chartSection(c: Ctx, r: EvidenceReport) {
  heading(c, '4. Conditions over the period')
  const drawable = r.charts.filter((ch) => ch.series.some((s) => s.points.some((p) => p[1] !== null)))
  if (!drawable.length) return noRecords(c, r, 'readings', 'No readings in the period.')
  para(c, 'Shaded: coats (spray and flash) and bakes. Times UTC. Calibrated values; long periods as means over buckets.', { size: 8.5, color: MUTED })
  for (const ch of drawable) {
    const h = (CONTENT_W / CHART_SIZE.width) * CHART_SIZE.height
    ensureSpace(c, h + 24)
    subheading(c, ch.title)
    const svg = parseSvg(renderChartSvg(ch))
    const y = c.doc.y
    drawSvg(c.doc as unknown as PdfCanvas, svg, MARGIN.left, y, CONTENT_W, { regular: c.regular, bold: c.bold })
    c.doc.y = y + h + 6
  }
}

function bakeSection(c: Ctx, r: EvidenceReport) {
  heading(c, '5. Bake and cure credit')
  if (!r.bakes.length) return noRecords(c, r, 'bakes')
  for (const b of r.bakes) {
    subheading(c, `Bake ${b.id} — ${b.boothName}, ${when(b.startedAt)} UTC`)
    keyValues(c, [
      ['State', `${b.state}${b.frozen ? ' (result frozen at sign-off)' : ' (computed from the stored readings)'}`],
      ['Jobs', b.jobs.join(', ') || '—'],
      ['Start – end', `${when(b.startedAt)} – ${b.endedAt ? when(b.endedAt) : 'running'}`],
      ['Hold target', b.targetC !== null ? `${num1(b.targetC)} °C` : '—'],
      ['Peak / hold', `${b.peakC !== null ? `${num1(b.peakC)} °C` : '—'} / ${b.holdMinutes !== null ? `${num1(b.holdMinutes)} min` : '—'}`],
      ['Verdict', b.verdict ?? '—'],
      ['Signed off', b.signedOffBy ? `${b.signedOffBy}, ${when(b.signedOffAt)} UTC${b.signOffNotes ? ` — ${b.signOffNotes}` : ''}` : 'not signed off'],
    ])
    if (b.schedules.length) {
      table(
        c,
        [
          { header: 'Schedule', w: 34 },
          { header: 'Needed min', w: 10, align: 'right' },
          { header: 'Cure credit min', w: 11, align: 'right' },
          { header: 'Held at temp. min', w: 11, align: 'right' },
          { header: 'Verdict', w: 8 },
          { header: 'Reason', w: 26 },
        ],
        b.schedules.map((s) => [s.label, num1(s.requiredMinutes), num1(s.equivalentMinutes), num1(s.heldMinutes), s.verdict, s.reason]),
      )
    } else para(c, 'No bake schedule to judge against.', { color: MUTED })
  }
}

function alertSection(c: Ctx, r: EvidenceReport) {
  heading(c, '6. Alerts in the period')
  if (!r.alerts.length) return noRecords(c, r, 'alerts', 'No alert was open during the period.')
  table(
    c,
    [
      { header: 'Opened (UTC)', w: 14 },
      { header: 'Booth', w: 12 },
      { header: 'Severity', w: 9 },
      { header: 'What', w: 30 },
      { header: 'Cleared', w: 10 },
      { header: 'How it was handled', w: 25 },
    ],
    r.alerts.map((a) => [
      when(a.openedAt),
      a.boothName,
      a.severity,
      a.message,
      a.clearedAt ? when(a.clearedAt) : '—',
      [a.acknowledged, a.resolved].filter(Boolean).join('; ') || `not handled (${a.state})`,
    ]),
  )
}

function revisionSection(c: Ctx, r: EvidenceReport) {
  heading(c, '7. Spec revisions used')
  if (!r.revisions.length) return noRecords(c, r, 'revisions')
  table(
    c,
    [
      { header: 'Product', w: 24 },
      { header: 'Rev.', w: 5, align: 'right' },
      { header: 'Flash (data sheet)', w: 25 },
      { header: 'Frozen (UTC)', w: 12 },
      { header: 'TDS file and its SHA-256', w: 34, size: 7 },
    ],
    // The hash in two halves of 32 hex digits: it fits the column and reads back unbroken from the text.
    r.revisions.map((v) => [
      v.product,
      String(v.number),
      v.flash,
      when(v.frozenAt),
      v.tdsSha256 ? `${v.tdsFileName ?? 'TDS'}\n${v.tdsSha256.slice(0, 32)}\n${v.tdsSha256.slice(32)}` : 'no TDS file attached',
    ]),
  )
}

function calibrationSection(c: Ctx, r: EvidenceReport) {
  heading(c, '8. Sensor calibration')
  if (!r.calibrations.length) return noRecords(c, r, 'calibrations')
  para(c, 'The calibration in force at the end of the period, per sensor. Offsets (reference − sensor) are applied to the readings in this pack from their effective time on.', {
    size: 8.5,
    color: MUTED,
  })
  table(
    c,
    [
      { header: 'Booth', w: 14 },
      { header: 'Sensor', w: 20 },
      { header: 'State', w: 13 },
      { header: 'Calibrated (UTC)', w: 14 },
      { header: 'Offset', w: 9, align: 'right' },
      { header: 'Next due', w: 12 },
      { header: 'Instrument', w: 18 },
    ],
    r.calibrations.map((k) => [k.boothName, k.label, k.state, when(k.effectiveAt), k.offset === null ? '—' : `${k.offset > 0 ? '+' : ''}${Math.round(k.offset * 100) / 100} ${k.unit}`, k.nextDueAt ? k.nextDueAt.slice(0, 10) : '—', k.instrument || '—']),
  )
}

function signOffSection(c: Ctx, r: EvidenceReport) {
  heading(c, '9. Sign-offs')
  if (!r.signOffs.length) return noRecords(c, r, 'signoffs')
  table(
    c,
    [
      { header: 'What', w: 30 },
      { header: 'By', w: 24 },
      { header: 'At (UTC)', w: 16 },
      { header: 'Notes', w: 30 },
    ],
    r.signOffs.map((s) => [s.what, s.by, when(s.at), s.notes || '—']),
  )
}

function readingsSection(c: Ctx, r: EvidenceReport) {
  heading(c, '10. Readings and the event log')
  const cov = r.coverage
  keyValues(c, [
    ['Readings stored', `${cov.rows.toLocaleString('en-US')} (one per second would be ${cov.expectedRows.toLocaleString('en-US')})`],
    ['Gaps', cov.gaps.length ? `${cov.gaps.length} of ${cov.minGapMinutes} min or more` : `none of ${cov.minGapMinutes} min or more`],
  ])
  if (cov.gaps.length) {
    table(
      c,
      [
        { header: 'No readings from (UTC)', w: 40 },
        { header: 'to', w: 40 },
        { header: 'Minutes', w: 20, align: 'right' },
      ],
      cov.gaps.slice(0, 40).map((g) => [when(g.from), when(g.to), String(g.minutes)]),
    )
    if (cov.gaps.length > 40) para(c, `… and ${cov.gaps.length - 40} more (the CSV holds every reading).`, { color: MUTED })
  }
  const ch = r.chain
  keyValues(c, [
    ['Chain head', ch.head ? `seq ${ch.head.seq}` : 'no events'],
    ['Head hash (SHA-256)', ch.head?.hash ?? '—'],
    ['Verified', ch.verified ? `intact: all ${ch.count} events link and hash correctly` : `NOT intact: first broken link at seq ${ch.brokenAt} (${ch.reason})`],
  ])
  para(
    c,
    'Every recorded action (coats, bakes, calibrations, alerts handled, this export) is an entry of an append-only log in which each entry carries the SHA-256 of the one before. Anyone with access can re-check the chain at /event-log; the head above lets a later check show that nothing before it changed.',
    { size: 8.5, color: MUTED },
  )
}

function aboutSection(c: Ctx, r: EvidenceReport) {
  heading(c, '11. About this pack')
  para(
    c,
    'The zip holds report.pdf (this report), environment-log.csv (every stored reading of the booths in the period, one row per reading) and manifest.json (what the pack covers, with the SHA-256 and size of each file). The export itself is recorded in the event log as "evidence.exported" with the SHA-256 of the manifest.',
  )
  para(
    c,
    'CSV: RFC 4180 (comma separated, CRLF line ends, fields with commas, quotes or line breaks quoted, quotes doubled), UTF-8 with a byte-order mark, a header row naming each column with its unit, times in ISO 8601 UTC. Values are calibrated; raw stored values follow in "_raw" columns when the booth has calibrations. Text cells that a spreadsheet would run as a formula (starting with = + - @) are prefixed with a single quote.',
  )
  para(c, `Units: ${r.units}.`)
}

// ── document ───────────────────────────────────────────────────────────────────────────────────────

function footers(c: Ctx, r: EvidenceReport) {
  const { doc } = c
  const range = doc.bufferedPageRange()
  const total = range.count
  for (let i = range.start; i < range.start + total; i++) {
    doc.switchToPage(i)
    const keep = doc.page.margins.bottom
    doc.page.margins.bottom = 0
    const y = doc.page.height - 40
    doc.moveTo(MARGIN.left, y - 6).lineTo(MARGIN.left + CONTENT_W, y - 6).lineWidth(0.4).strokeColor(RULE).stroke()
    doc.font(c.regular).fontSize(7.5).fillColor(MUTED)
    doc.text(c.t(`Generated ${when(r.generatedAt)} UTC by ${r.generatedBy.name} (${r.generatedBy.role}) · export ${r.exportId}`), MARGIN.left, y, { width: CONTENT_W * 0.8, lineBreak: false })
    doc.text(`Page ${i - range.start + 1} of ${total}`, MARGIN.left, y, { width: CONTENT_W, align: 'right', lineBreak: false })
    if (i > range.start) {
      doc.page.margins.top = 0
      doc.text(c.t(`Boothbeat evidence pack · ${r.title}`), MARGIN.left, 30, { width: CONTENT_W, lineBreak: false })
      doc.page.margins.top = MARGIN.top
    }
    doc.page.margins.bottom = keep
  }
}

/** The report as a pdfkit document; read it (or pipe it) for the bytes. */
export function renderReportPdf(r: EvidenceReport, fonts: PdfFonts | null): Doc {
  const doc = new PDFDocument({
    size: 'A4',
    margins: MARGIN,
    bufferPages: true,
    autoFirstPage: true,
    info: {
      Title: `Evidence pack — ${r.title}`,
      Author: 'Boothbeat',
      Subject: `Export ${r.exportId}`,
      Creator: 'Boothbeat',
      CreationDate: new Date(r.generatedAt),
    },
  })
  let ctx: Ctx
  if (fonts) {
    doc.registerFont('body', Buffer.from(fonts.regular))
    doc.registerFont('body-bold', Buffer.from(fonts.bold))
    ctx = { doc, regular: 'body', bold: 'body-bold', t: (s) => s }
  } else {
    ctx = { doc, regular: 'Helvetica', bold: 'Helvetica-Bold', t: (s) => WINANSI_FALLBACK.reduce((acc, [re, to]) => acc.replace(re, to), s) }
  }
  doc.font(ctx.regular)
  titleBlock(ctx, r)
  jobSection(ctx, r)
  planSection(ctx, r)
  coatSection(ctx, r)
  chartSection(ctx, r)
  bakeSection(ctx, r)
  alertSection(ctx, r)
  revisionSection(ctx, r)
  calibrationSection(ctx, r)
  signOffSection(ctx, r)
  readingsSection(ctx, r)
  aboutSection(ctx, r)
  footers(ctx, r)
  doc.end()
  return doc
}
