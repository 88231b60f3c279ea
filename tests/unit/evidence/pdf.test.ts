import { describe, expect, it } from 'vitest'
import { PDFParse } from 'pdf-parse'
import { renderReportPdf } from '../../../server/evidence/pdf'
import { fonts, sampleReport } from './fixtures'
import type { EvidenceReport } from '../../../server/evidence/types'

async function pdfText(r: EvidenceReport, withFonts = true): Promise<{ text: string; pages: number; bytes: Buffer }> {
  const doc = renderReportPdf(r, withFonts ? fonts : null)
  const chunks: Buffer[] = []
  for await (const c of doc) chunks.push(c as Buffer)
  const bytes = Buffer.concat(chunks)
  const parser = new PDFParse({ data: bytes })
  const t = await parser.getText()
  await parser.destroy()
  // Wrapped lines come back as line breaks: compare with runs of white space made one space.
  return { text: t.text.replace(/\s+/g, ' '), pages: t.total, bytes }
}

describe('the evidence report PDF', () => {
  it('holds the coat table and each coat’s verdict with its reason', async () => {
    const { text, bytes } = await pdfText(sampleReport())
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-')
    expect(text).toContain('3. Coats')
    expect(text).toMatch(/Coat\s+Product\s+Booth\s+Start \(UTC\)/)
    expect(text).toMatch(/1\.1\s+Waterborne basecoat, silver/)
    expect(text).toContain('waited 9 min; 7.5 min needed at 17 °C / 64 % RH → followed the data sheet')
    expect(text).toContain('recoated before the flash-off was complete')
    expect(text).toContain('Too early')
    expect(text).toContain('customer waiting')
  })

  it('has the sections a reviewer reads: bake with cure credit, alerts, revisions with the TDS hash, calibration, sign-offs, chain head', async () => {
    const { text } = await pdfText(sampleReport())
    for (const s of ['1. Job and vehicle', '2. Finish plan', '5. Bake and cure credit', '6. Alerts in the period', '7. Spec revisions used', '8. Sensor calibration', '9. Sign-offs', '10. Readings and the event log']) {
      expect(text).toContain(s)
    }
    expect(text).toContain('cure credit 33.4 min')
    expect(text).toContain('Humidity above 70 % for 5 min')
    expect(text).toContain('a'.repeat(32))
    expect(text).toContain('never calibrated')
    expect(text).toContain('Tomas Reedley')
    expect(text).toContain('b'.repeat(64))
    expect(text).toContain('seq 42')
  })

  it('numbers the pages and says when and by whom it was generated on each', async () => {
    const { text, pages } = await pdfText(sampleReport())
    expect(pages).toBeGreaterThan(1)
    for (let i = 1; i <= pages; i++) expect(text).toContain(`Page ${i} of ${pages}`)
    expect(text.match(/Generated 2026-12-01 09:00 UTC by Odette Brackwater \(auditor\)/g)!.length).toBe(pages)
  })

  it('says "no records" for empty sections, and names a section whose area is not set up', async () => {
    const { text } = await pdfText(sampleReport({ bakes: [], alerts: [], calibrations: [], notes: [{ section: 'calibrations', note: 'this part of Boothbeat is not set up in this database yet' }] }))
    expect(text).toContain('5. Bake and cure credit No records.')
    expect(text).toContain('No alert was open during the period.')
    expect(text).toContain('No records: this part of Boothbeat is not set up')
  })

  it('still renders with the built-in Helvetica, spelling out symbols it cannot encode', async () => {
    const { text } = await pdfText(sampleReport(), false)
    expect(text).toContain('waited 9 min; 7.5 min needed at 17 °C / 64 % RH -> followed the data sheet')
  })
})
