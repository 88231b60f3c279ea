import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import PackPreview from '~/components/evidence/PackPreview.vue'
import type { PackSummary } from '~/components/evidence/evidence'

const gap = (from: string, to: string, minutes: number) => ({ from, to, minutes })

const summary = (gaps: PackSummary['coverage']['gaps']): PackSummary => ({
  title: 'Job RO-24109',
  period: { from: '2026-11-30T08:00:00.000Z', to: '2026-11-30T10:00:00.000Z' },
  booths: [{ id: 2, slug: 'downdraft-2', name: 'Downdraft booth 2' }],
  coats: [],
  bakes: [],
  alerts: [],
  revisions: [],
  calibrations: [],
  signOffs: [],
  chain: { head: { seq: 29, hash: 'ab'.repeat(32) }, verified: true, count: 29, brokenAt: null, reason: null },
  coverage: { rows: 7000, expectedRows: 7200, ratio: 7000 / 7200, gaps },
  notes: [],
})

async function coverageText(gaps: PackSummary['coverage']['gaps']): Promise<string> {
  const w = await mountSuspended(PackPreview, { props: { summary: summary(gaps) }, route: false })
  return w.text()
}

describe('PackPreview coverage line', () => {
  it('says "no gaps", "1 gap" and "2 gaps" as a reader would', async () => {
    expect(await coverageText([])).toContain('97.2 % of one per second), no gaps')
    const one = await coverageText([gap('2026-11-30T09:00:00.000Z', '2026-11-30T09:06:00.000Z', 6)])
    expect(one).toContain('), 1 gap')
    expect(one).not.toContain('1 gaps')
    const two = await coverageText([gap('2026-11-30T09:00:00.000Z', '2026-11-30T09:06:00.000Z', 6), gap('2026-11-30T09:30:00.000Z', '2026-11-30T09:40:00.000Z', 10)])
    expect(two).toContain('), 2 gaps')
  })
})
