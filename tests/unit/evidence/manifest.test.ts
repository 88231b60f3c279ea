import { describe, expect, it } from 'vitest'
import { Readable, pipeline } from 'node:stream'
import { createHash } from 'node:crypto'
import { buildManifest, manifestText, PACK_FILES } from '../../../server/evidence/manifest'
import { HashStream } from '../../../server/evidence/hash-stream'
import { sampleReport } from './fixtures'

describe('manifest', () => {
  it('lists each file with its hash and size, and what the pack covers', () => {
    const m = buildManifest({
      report: sampleReport(),
      pdf: { sha256: '1'.repeat(64), bytes: 1234 },
      csv: { sha256: '2'.repeat(64), bytes: 99, rows: 8100, columns: ['time_utc [ISO 8601]'] },
    })
    expect(m.files.map((f) => [f.name, f.sha256, f.bytes])).toEqual([
      [PACK_FILES.pdf, '1'.repeat(64), 1234],
      [PACK_FILES.csv, '2'.repeat(64), 99],
    ])
    expect(m.scope).toEqual({ kind: 'job', jobId: 1, jobNumber: 'RO-4711', vehicle: '2019 hatchback, grey' })
    expect(m.counts).toMatchObject({ readings: 8100, coats: 3, bakes: 1, alerts: 1 })
    expect(m.coatVerdicts).toEqual({ followed: 1, too_early: 1, last_coat: 1 })
    expect(m.eventLog).toEqual({ head: { seq: 42, hash: 'b'.repeat(64) }, verified: true, events: 42 })
    expect(m.generatedBy.name).toBe('Odette Brackwater')
    expect(JSON.parse(manifestText(m))).toEqual(m)
  })
})

describe('hashing while streaming', () => {
  it('gives the SHA-256 and size of what went through, and runs beforeEnd before the end', async () => {
    const data = Buffer.from('x'.repeat(100_000))
    const order: string[] = []
    const h = new HashStream(async (d) => {
      order.push(`before-end ${d.bytes}`)
    })
    const out: Buffer[] = []
    h.on('data', (c: Buffer) => out.push(c))
    h.on('end', () => order.push('end'))
    pipeline(Readable.from([data.subarray(0, 70_000), data.subarray(70_000)]), h, () => undefined)
    const d = await h.digest
    await new Promise((r) => h.once('end', r))
    expect(d).toEqual({ sha256: createHash('sha256').update(data).digest('hex'), bytes: 100_000 })
    expect(Buffer.concat(out).equals(data)).toBe(true)
    expect(order).toEqual(['before-end 100000', 'end'])
  })

  it('fails the stream when beforeEnd fails', async () => {
    const h = new HashStream(async () => {
      throw new Error('could not record')
    })
    const done = new Promise<Error | null | undefined>((r) => pipeline(Readable.from([Buffer.from('a')]), h, (e) => r(e)))
    h.resume()
    await expect(done).resolves.toMatchObject({ message: 'could not record' })
    await expect(h.digest).rejects.toThrow()
  })
})
