import { request as httpRequest } from 'node:http'
import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { TDS_MAX_BYTES } from '#shared/schemas/spec'
import { freezeRevision } from '../../server/repositories/specs'
import { verifyChain } from '../../server/domain/event-log'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'

let app: TestApp
beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
})
afterAll(async () => {
  await app?.close()
})

// ── helpers ─────────────────────────────────────────────────────────────────────────────────────

interface Revision {
  id: number
  productId: number
  number: number
  refTempC: number
  coats: number
  flashMinMinutes: number
  potLifeMinutes: number | null
  reducerBands: { fromC: number | null; toC: number | null; grade: string }[]
  frozenAt: string | null
  tds: { sha256: string; name: string; sizeBytes: number; url: string } | null
}
interface Product {
  id: number
  name: string
  chemistry: string
  components: number
}

let seq = 0
const uniqueName = (base: string) => `${base} ${Date.now().toString(36)}-${++seq}`

function revisionBody(over: Record<string, unknown> = {}) {
  return {
    refTempC: 20,
    flashMinMinutes: 5,
    flashMaxMinutes: 10,
    flashBeforeNextMinutes: 15,
    coats: 2,
    potLifeMinutes: 60,
    mixRatio: '4:1:1',
    reducerBands: [
      { fromC: null, toC: 18, grade: 'Fast' },
      { fromC: 18, toC: null, grade: 'Slow' },
    ],
    minAirTempC: 15,
    maxAirTempC: 35,
    bakeSchedules: [{ objectTempC: 60, minutes: 30 }],
    minCureTempC: 10,
    ...over,
  }
}

async function newProduct(c: ApiClient, over: Record<string, unknown> = {}): Promise<Product> {
  const r = await c.post<{ product: Product }>('/api/products', { name: uniqueName('Test primer'), category: 'primer_surfacer', chemistry: 'solvent', components: 2, ...over })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body.product
}

async function newRevision(c: ApiClient, productId: number, over: Record<string, unknown> = {}): Promise<Revision> {
  const r = await c.post<{ revision: Revision }>(`/api/products/${productId}/revisions`, revisionBody(over))
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body.revision
}

/** A small but well-formed PDF (one empty page), as bytes. */
function tinyPdf(note = ''): Uint8Array {
  const objects = [
    '1 0 obj\n<< /Type /Catalog /Pages 2 0 R >>\nendobj\n',
    '2 0 obj\n<< /Type /Pages /Kids [3 0 R] /Count 1 >>\nendobj\n',
    `3 0 obj\n<< /Type /Page /Parent 2 0 R /MediaBox [0 0 200 200] >>\nendobj\n% ${note}\n`,
  ]
  let body = '%PDF-1.4\n'
  const offsets: number[] = []
  for (const o of objects) {
    offsets.push(body.length)
    body += o
  }
  const xref = body.length
  body += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n${offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('')}`
  body += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`
  return new TextEncoder().encode(body)
}

async function upload(c: ApiClient, revisionId: number, bytes: Uint8Array, name: string) {
  const form = new FormData()
  form.append('file', new Blob([bytes as Uint8Array<ArrayBuffer>], { type: 'application/pdf' }), name)
  const res = await fetch(`${app.url}/api/spec-revisions/${revisionId}/tds`, { method: 'POST', body: form, headers: c.cookie ? { cookie: c.cookie } : {} })
  const text = await res.text()
  let body: Record<string, unknown> = {}
  try {
    body = JSON.parse(text) as Record<string, unknown>
  } catch {
    body = { text }
  }
  return { status: res.status, body }
}

async function eventsOf(type: string, subjectId: number) {
  return app.db.selectFrom('event_log').selectAll().where('type', '=', type).where('subject_id', '=', String(subjectId)).execute()
}

// ── tests ───────────────────────────────────────────────────────────────────────────────────────

describe('spec sheets: access', () => {
  it('answers 401 to anyone not signed in', async () => {
    const anon = app.client()
    expect((await anon.get('/api/products')).status).toBe(401)
    expect((await anon.post('/api/products', { name: 'x', category: 'other', chemistry: 'solvent', components: 1 })).status).toBe(401)
    expect((await anon.post('/api/spec-preview', { revisionId: 1, airTempC: 20, rhPct: 50 })).status).toBe(401)
  })

  it('lets every role read and only admin, manager and tech write', async () => {
    const manager = await app.as('manager')
    const product = await newProduct(manager)
    const revision = await newRevision(manager, product.id)
    for (const role of ['painter', 'auditor']) {
      const c = await app.as(role)
      expect((await c.get('/api/products')).status, role).toBe(200)
      expect((await c.get(`/api/products/${product.id}`)).status, role).toBe(200)
      expect((await c.get(`/api/spec-revisions/${revision.id}`)).status, role).toBe(200)
      expect((await c.post('/api/products', { name: uniqueName('Nope'), category: 'other', chemistry: 'solvent', components: 1 })).status, role).toBe(403)
      expect((await c.post(`/api/products/${product.id}/revisions`, revisionBody())).status, role).toBe(403)
      expect((await c.patch(`/api/spec-revisions/${revision.id}`, { coats: 3 })).status, role).toBe(403)
      expect((await c.patch(`/api/products/${product.id}`, { notes: 'x' })).status, role).toBe(403)
      expect((await c.post(`/api/spec-revisions/${revision.id}/freeze`)).status, role).toBe(403)
      expect((await upload(c, revision.id, tinyPdf(), 'tds.pdf')).status, role).toBe(403)
    }
    // Nothing the refused calls tried was written.
    const after = await manager.get<{ revisions: Revision[] }>(`/api/products/${product.id}/revisions`)
    expect(after.body.revisions).toHaveLength(1)
    expect(after.body.revisions[0]!.coats).toBe(2)
    expect(after.body.revisions[0]!.frozenAt).toBeNull()
  })
})

describe('spec sheets: products and revisions', () => {
  it('lists the invented demo products, one revision each', async () => {
    const c = await app.as('painter')
    const r = await c.get<{ products: (Product & { revisionCount: number; latestRevision: { number: number; frozenAt: string | null } | null })[] }>('/api/products')
    expect(r.status).toBe(200)
    const names = r.body.products.map((p) => p.name)
    for (const n of ['2K high-build primer surfacer', 'Waterborne basecoat, silver metallic', '2K high-solids clearcoat', 'Clear binder wet bed']) {
      expect(names).toContain(n)
    }
    const base = r.body.products.find((p) => p.name === 'Waterborne basecoat, silver metallic')!
    expect(base).toMatchObject({ chemistry: 'waterborne', components: 1, revisionCount: 1, latestRevision: { number: 1, frozenAt: null } })
  })

  it('lets a manager create a product and its first revision (201) and records both', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c, { notes: 'invented' })
    expect(product).toMatchObject({ category: 'primer_surfacer', chemistry: 'solvent', components: 2 })
    const revision = await newRevision(c, product.id)
    expect(revision).toMatchObject({ productId: product.id, number: 1, refTempC: 20, frozenAt: null, tds: null })
    expect(await eventsOf('spec.product.created', product.id)).toHaveLength(1)
    expect(await eventsOf('spec.revision.created', revision.id)).toHaveLength(1)
  })

  it('lets a tech create them too, and numbers further revisions 2, 3', async () => {
    const c = await app.as('tech')
    const product = await newProduct(c)
    expect((await newRevision(c, product.id)).number).toBe(1)
    expect((await newRevision(c, product.id, { coats: 3 })).number).toBe(2)
    expect((await newRevision(c, product.id, { coats: 4 })).number).toBe(3)
  })

  it('refuses a duplicate product name (409) and a chemistry change once there are revisions', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const dup = await c.post('/api/products', { name: product.name.toUpperCase(), category: 'sealer', chemistry: 'solvent', components: 1 })
    expect(dup.status).toBe(409)
    expect((await c.patch(`/api/products/${product.id}`, { chemistry: 'waterborne' })).status).toBe(200)
    await newRevision(c, product.id, { wbRefRhPct: 50, potLifeMinutes: 60 })
    const change = await c.patch<{ message: string }>(`/api/products/${product.id}`, { components: 1 })
    expect(change.status).toBe(409)
    expect(change.body.message).toMatch(/new product/)
    expect((await c.patch(`/api/products/${product.id}`, { name: uniqueName('Renamed') })).status).toBe(200)
  })

  it('returns field problems in the stable error shape', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const r = await c.post(`/api/products/${product.id}/revisions`, revisionBody({ coats: 9, reducerBands: [] }))
    expect(r.status).toBe(400)
    expect(r.body).toEqual({ statusCode: 400, message: expect.any(String), issues: [{ path: 'coats', message: 'The number of coats must be between 1 and 6' }] })
    const overlap = await c.post(`/api/products/${product.id}/revisions`, revisionBody({ reducerBands: [{ fromC: 10, toC: 22, grade: 'A' }, { fromC: 20, toC: 30, grade: 'B' }] }))
    expect(overlap.status).toBe(400)
    expect(overlap.body).toMatchObject({ issues: [{ path: 'reducerBands.1.fromC' }] })
    // Product rules come back at the field too: a 2K revision without pot life.
    const noPot = await c.post(`/api/products/${product.id}/revisions`, revisionBody({ potLifeMinutes: null }))
    expect(noPot.status).toBe(400)
    expect(noPot.body).toMatchObject({ statusCode: 400, issues: [{ path: 'potLifeMinutes', message: expect.stringMatching(/2K/) }] })
    const bad = await c.post('/api/products', { name: '', category: 'paint', chemistry: 'solvent', components: 2 })
    expect(bad.status).toBe(400)
    expect((bad.body as { issues: { path: string }[] }).issues.map((i) => i.path).sort()).toEqual(['category', 'name'])
    expect((await c.get('/api/products/999999')).status).toBe(404)
    expect((await c.get('/api/products/abc')).status).toBe(400)
  })

  it('accepts °F with unit F and stores °C', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const r = await c.post<{ revision: Revision }>(`/api/products/${product.id}/revisions`, {
      ...revisionBody({ refTempC: 68, minAirTempC: 59, maxAirTempC: 95, minCureTempC: 50, bakeSchedules: [{ objectTempC: 140, minutes: 30 }] }),
      unit: 'F',
      reducerBands: [
        { fromC: null, toC: 64.4, grade: 'Fast' },
        { fromC: 64.4, toC: null, grade: 'Slow' },
      ],
    })
    expect(r.status).toBe(201)
    const stored = await app.db.selectFrom('spec_revisions').selectAll().where('id', '=', r.body.revision.id).executeTakeFirstOrThrow()
    expect(stored.ref_temp_c).toBeCloseTo(20, 9)
    expect(stored.min_air_temp_c).toBeCloseTo(15, 9)
    expect(stored.bake_schedules[0]!.objectTempC).toBeCloseTo(60, 9)
    expect(stored.reducer_bands[0]!.toC).toBeCloseTo(18, 9)
    // A °F value out of the °F range is refused with a °F message.
    const cold = await c.post(`/api/products/${product.id}/revisions`, { ...revisionBody({ refTempC: 20 }), unit: 'F', minAirTempC: null, maxAirTempC: null, minCureTempC: 50, bakeSchedules: [] })
    expect(cold.status).toBe(400)
    expect(cold.body).toMatchObject({ issues: [{ path: 'refTempC', message: expect.stringMatching(/°F/) }] })
  })

  it('updates a draft revision in place', async () => {
    const c = await app.as('tech')
    const product = await newProduct(c)
    const rev = await newRevision(c, product.id)
    const r = await c.patch<{ revision: Revision; created: boolean }>(`/api/spec-revisions/${rev.id}`, { coats: 3, flashMinMinutes: 6 })
    expect(r.status).toBe(200)
    expect(r.body.created).toBe(false)
    expect(r.body.revision).toMatchObject({ id: rev.id, number: 1, coats: 3, flashMinMinutes: 6 })
    const list = await c.get<{ revisions: Revision[] }>(`/api/products/${product.id}/revisions`)
    expect(list.body.revisions).toHaveLength(1)
    expect(list.body.revisions[0]).toMatchObject({ id: rev.id, coats: 3 })
    const events = await eventsOf('spec.revision.updated', rev.id)
    expect(events).toHaveLength(1)
    expect(JSON.parse(events[0]!.payload).changed.sort()).toEqual(['coats', 'flashMinMinutes'])
    // A change that breaks a rule between fields is refused at its field, and nothing changes.
    const bad = await c.patch(`/api/spec-revisions/${rev.id}`, { flashMaxMinutes: 2 })
    expect(bad.status).toBe(400)
    expect(bad.body).toMatchObject({ issues: [{ path: 'flashMaxMinutes' }] })
    expect((await c.get<{ revision: Revision }>(`/api/spec-revisions/${rev.id}`)).body.revision.flashMinMinutes).toBe(6)
  })

  it('after freezeRevision an edit makes revision 2 and leaves revision 1 as it was', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const rev1 = await newRevision(c, product.id, { coats: 2 })
    const pdf = tinyPdf('frozen copy')
    expect((await upload(c, rev1.id, pdf, 'primer.pdf')).status).toBe(201)

    const first = await app.db.transaction().execute((tx) => freezeRevision(tx, rev1.id, { usedBy: { type: 'coat', id: 1 } }))
    expect(first?.newlyFrozen).toBe(true)
    expect(first?.revision.frozenAt).toBeInstanceOf(Date)
    const again = await app.db.transaction().execute((tx) => freezeRevision(tx, rev1.id))
    expect(again?.newlyFrozen).toBe(false)
    expect(again?.revision.frozenAt?.getTime()).toBe(first!.revision.frozenAt!.getTime())
    expect(await eventsOf('spec.revision.frozen', rev1.id)).toHaveLength(1)
    expect(await app.db.transaction().execute((tx) => freezeRevision(tx, 99_999_999))).toBeUndefined()

    const before = (await c.get<{ revision: Revision }>(`/api/spec-revisions/${rev1.id}`)).body.revision
    const edit = await c.patch<{ revision: Revision; created: boolean; fromRevisionId: number }>(`/api/spec-revisions/${rev1.id}`, { coats: 3, potLifeMinutes: 45 })
    expect(edit.status).toBe(201)
    expect(edit.body.created).toBe(true)
    expect(edit.body.fromRevisionId).toBe(rev1.id)
    expect(edit.body.revision).toMatchObject({ productId: product.id, number: 2, coats: 3, potLifeMinutes: 45, frozenAt: null })
    expect(edit.body.revision.id).not.toBe(rev1.id)
    // The copy keeps everything else, the data sheet included.
    expect(edit.body.revision.reducerBands).toEqual(before.reducerBands)
    expect(edit.body.revision.tds?.sha256).toBe(before.tds?.sha256)

    const after = (await c.get<{ revision: Revision }>(`/api/spec-revisions/${rev1.id}`)).body.revision
    expect(after).toEqual(before)
    const history = await c.get<{ revisions: Revision[] }>(`/api/products/${product.id}/revisions`)
    expect(history.body.revisions.map((r) => [r.number, r.coats, r.frozenAt !== null])).toEqual([
      [2, 3, false],
      [1, 2, true],
    ])
    const created = await eventsOf('spec.revision.created', edit.body.revision.id)
    expect(JSON.parse(created[0]!.payload)).toMatchObject({ fromRevisionId: rev1.id, number: 2 })
  })

  it('keeps a frozen revision unchanged even against a direct database update', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const rev = await newRevision(c, product.id)
    const frozen = await c.post<{ newlyFrozen: boolean; revision: Revision }>(`/api/spec-revisions/${rev.id}/freeze`)
    expect(frozen.status).toBe(200)
    expect(frozen.body.newlyFrozen).toBe(true)
    expect((await c.post<{ newlyFrozen: boolean }>(`/api/spec-revisions/${rev.id}/freeze`)).body.newlyFrozen).toBe(false)
    await expect(app.db.updateTable('spec_revisions').set({ coats: 5 }).where('id', '=', rev.id).execute()).rejects.toThrow(/frozen/)
    await expect(app.db.deleteFrom('spec_revisions').where('id', '=', rev.id).execute()).rejects.toThrow(/frozen/)
    // An unchanged edit of a frozen revision makes no copy.
    const same = await c.patch<{ created: boolean }>(`/api/spec-revisions/${rev.id}`, { coats: 2 })
    expect(same.status).toBe(200)
    expect(same.body.created).toBe(false)
  })

  it('does not count °F display rounding as a change of a frozen revision', async () => {
    const c = await app.as('manager')
    const product = await newProduct(c)
    const rev = await newRevision(c, product.id, { minAirTempC: 17.333 })
    await c.post(`/api/spec-revisions/${rev.id}/freeze`)
    // 17.333 °C shows as 63.2 °F (two decimals) and comes back as 17.3333 °C.
    const same = await c.patch<{ created: boolean; revision: Revision & { minAirTempC: number } }>(`/api/spec-revisions/${rev.id}`, { unit: 'F', minAirTempC: 63.2, refTempC: 68 })
    expect(same.status).toBe(200)
    expect(same.body.created).toBe(false)
    const real = await c.patch<{ created: boolean; revision: Revision & { minAirTempC: number } }>(`/api/spec-revisions/${rev.id}`, { unit: 'F', minAirTempC: 64 })
    expect(real.status).toBe(201)
    expect(real.body.revision.minAirTempC).toBeCloseTo(17.7778, 3)
  })
})

describe('spec sheets: TDS upload', () => {
  let revId: number
  beforeAll(async () => {
    const c = await app.as('manager')
    revId = (await newRevision(c, (await newProduct(c)).id)).id
  })

  it('accepts a PDF, stores it by SHA-256 and serves it only to signed-in users', async () => {
    const c = await app.as('tech')
    const pdf = tinyPdf('accepted')
    const sha = createHash('sha256').update(pdf).digest('hex')
    const r = await upload(c, revId, pdf, 'Primer TDS.pdf')
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.file).toEqual({ sha256: sha, sizeBytes: pdf.byteLength, name: 'Primer TDS.pdf', url: `/api/files/${sha}` })
    expect((r.body.revision as Revision).tds).toMatchObject({ sha256: sha, name: 'Primer TDS.pdf' })
    expect(await eventsOf('spec.tds.attached', revId)).toHaveLength(1)

    const anon = await fetch(`${app.url}/api/files/${sha}`)
    expect(anon.status).toBe(401)
    const painter = await app.as('painter')
    const dl = await fetch(`${app.url}/api/files/${sha}`, { headers: { cookie: painter.cookie } })
    expect(dl.status).toBe(200)
    expect(dl.headers.get('content-type')).toBe('application/pdf')
    expect(dl.headers.get('content-disposition')).toMatch(/^attachment; filename="Primer TDS.pdf"/)
    expect(dl.headers.get('x-content-type-options')).toBe('nosniff')
    expect(new Uint8Array(await dl.arrayBuffer())).toEqual(pdf)
    expect((await fetch(`${app.url}/api/files/${'0'.repeat(64)}`, { headers: { cookie: painter.cookie } })).status).toBe(404)
    expect((await fetch(`${app.url}/api/files/..%2F..%2Fetc%2Fpasswd`, { headers: { cookie: painter.cookie } })).status).toBe(400)
  })

  it('stores the same bytes once', async () => {
    const c = await app.as('manager')
    const other = (await newRevision(c, (await newProduct(c)).id)).id
    const pdf = tinyPdf('dedupe')
    const a = await upload(c, revId, pdf, 'one.pdf')
    const b = await upload(c, other, pdf, 'two.pdf')
    expect(a.status).toBe(201)
    expect(b.status).toBe(201)
    const sha = (a.body.file as { sha256: string }).sha256
    expect((b.body.file as { sha256: string }).sha256).toBe(sha)
    const rows = await app.db.selectFrom('files').selectAll().where('sha256', '=', sha).execute()
    expect(rows).toHaveLength(1)
  })

  it('refuses bytes that are not a PDF, whatever the name says (415)', async () => {
    const c = await app.as('manager')
    const html = new TextEncoder().encode('<html><body>%PDF-1.4 not really</body></html>')
    const r = await upload(c, revId, html, 'looks-fine.pdf')
    expect(r.status).toBe(415)
    expect(r.body.message).toMatch(/not a PDF/)
  })

  it('refuses a file over 20 MB (413), from its size and early from Content-Length', async () => {
    const c = await app.as('manager')
    const big = new Uint8Array(TDS_MAX_BYTES + 1)
    big.set(new TextEncoder().encode('%PDF-1.4\n'))
    const r = await upload(c, revId, big, 'big.pdf')
    expect(r.status).toBe(413)
    expect(r.body.message).toMatch(/20 MB/)
    const huge = new Uint8Array(TDS_MAX_BYTES + 200_000)
    huge.set(new TextEncoder().encode('%PDF-1.4\n'))
    expect((await upload(c, revId, huge, 'huge.pdf')).status).toBe(413)

    // Early: the server answers from the header, before the body arrives.
    const status = await new Promise<number>((resolve, reject) => {
      const req = httpRequest(
        `${app.url}/api/spec-revisions/${revId}/tds`,
        { method: 'POST', headers: { cookie: c.cookie, 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(200 * 1024 * 1024) } },
        (res) => {
          res.resume()
          resolve(res.statusCode ?? 0)
          req.destroy()
        },
      )
      req.on('error', reject)
      req.write('--x\r\n')
    })
    expect(status).toBe(413)
  })

  it('sanitises odd file names', async () => {
    const c = await app.as('manager')
    const odd = '..\\..\\windows\\system32\\e\u0007vil\u202Efdp.exe'
    const r = await upload(c, revId, tinyPdf('odd name'), odd)
    expect(r.status).toBe(201)
    expect((r.body.file as { name: string }).name).toBe('evilfdp.exe.pdf')
    const long = await upload(c, revId, tinyPdf('long name'), `${'x'.repeat(400)}.pdf`)
    expect(long.status).toBe(201)
    const name = (long.body.file as { name: string }).name
    expect(name.length).toBeLessThanOrEqual(120)
    expect(name.endsWith('.pdf')).toBe(true)
  })

  it('refuses a multipart body without a file, and a non-multipart body', async () => {
    const c = await app.as('manager')
    const form = new FormData()
    form.append('note', 'no file here')
    const none = await fetch(`${app.url}/api/spec-revisions/${revId}/tds`, { method: 'POST', body: form, headers: { cookie: c.cookie } })
    expect(none.status).toBe(400)
    expect((await c.post(`/api/spec-revisions/${revId}/tds`, { file: 'x' })).status).toBe(415)
  })

  it('does not replace the data sheet of a frozen revision', async () => {
    const c = await app.as('manager')
    const rev = (await newRevision(c, (await newProduct(c)).id)).id
    await c.post(`/api/spec-revisions/${rev}/freeze`)
    // A frozen revision without a data sheet may still get its first one …
    expect((await upload(c, rev, tinyPdf('late'), 'late.pdf')).status).toBe(201)
    // … but not a different one.
    const again = await upload(c, rev, tinyPdf('other'), 'other.pdf')
    expect(again.status).toBe(409)
  })
})

describe('spec sheets: preview', () => {
  async function demoRevisionId(name: string) {
    const p = await app.db.selectFrom('products').select('id').where('name', '=', name).executeTakeFirstOrThrow()
    return (await app.db.selectFrom('spec_revisions').select('id').where('product_id', '=', p.id).where('number', '=', 1).executeTakeFirstOrThrow()).id
  }
  type Preview = {
    flash: { betweenCoats: { min: { minutes: number }; max: { minutes: number } }; beforeNext: { minutes: number }; rate: number }
    potLife: { minutes: number; refMinutes: number } | null
    cure: { schedules: { creditFraction: number; minutesToComplete: number }[] }
    reducer: { advised: string | null }
    summary: string[]
  }

  it('stretches flash and pot life when colder, and any role may ask', async () => {
    const c = await app.as('painter')
    const id = await demoRevisionId('2K high-build primer surfacer')
    const warm = await c.post<Preview>('/api/spec-preview', { revisionId: id, airTempC: 20, rhPct: 50 })
    const cold = await c.post<Preview>('/api/spec-preview', { revisionId: id, airTempC: 12, rhPct: 75 })
    expect(warm.status).toBe(200)
    expect(cold.status).toBe(200)
    expect(warm.body.flash.betweenCoats.min.minutes).toBeCloseTo(5, 6)
    expect(cold.body.flash.betweenCoats.min.minutes).toBeGreaterThan(warm.body.flash.betweenCoats.min.minutes * 1.5)
    expect(cold.body.flash.beforeNext.minutes).toBeGreaterThan(warm.body.flash.beforeNext.minutes)
    expect(cold.body.potLife!.minutes).toBeGreaterThan(warm.body.potLife!.minutes)
    expect(cold.body.reducer.advised).toBe('Fast')
    expect(warm.body.reducer.advised).toBe('Standard')
    expect(cold.body.summary[0]).toMatch(/^At 12 °C and 75 % RH the flash between coats takes about/)
    // A hotter panel earns the bake's credit sooner.
    const bake = await c.post<Preview>('/api/spec-preview', { revisionId: id, airTempC: 60, rhPct: 10, panelTempC: 60 })
    const cool = await c.post<Preview>('/api/spec-preview', { revisionId: id, airTempC: 60, rhPct: 10, panelTempC: 50 })
    expect(bake.body.cure.schedules[0]!.creditFraction).toBeCloseTo(1, 6)
    expect(cool.body.cure.schedules[0]!.creditFraction).toBeLessThan(1)
    expect(cool.body.cure.schedules[0]!.minutesToComplete).toBeGreaterThan(bake.body.cure.schedules[0]!.minutesToComplete)
  })

  it('slows a waterborne flash in humid air, from fields sent with the request', async () => {
    const c = await app.as('manager')
    const body = (rh: number) => ({
      product: { chemistry: 'waterborne', components: 1 },
      revision: { refTempC: 20, flashMinMinutes: 4, flashMaxMinutes: 8, flashBeforeNextMinutes: 15, coats: 2 },
      airTempC: 20,
      rhPct: rh,
      airflowMps: 0.3,
    })
    const dry = await c.post<Preview>('/api/spec-preview', body(50))
    const humid = await c.post<Preview>('/api/spec-preview', body(80))
    expect(dry.status).toBe(200)
    expect(humid.body.flash.betweenCoats.min.minutes).toBeGreaterThan(dry.body.flash.betweenCoats.min.minutes)
  })

  it('refuses a request without a revision, and product rules apply to sent fields', async () => {
    const c = await app.as('manager')
    const none = await c.post('/api/spec-preview', { airTempC: 20, rhPct: 50 })
    expect(none.status).toBe(400)
    expect(none.body).toMatchObject({ issues: [{ path: 'revisionId' }] })
    const noPot = await c.post('/api/spec-preview', {
      product: { chemistry: 'solvent', components: 2 },
      revision: { refTempC: 20, flashMinMinutes: 4, flashMaxMinutes: 8, flashBeforeNextMinutes: 15, coats: 2, mixRatio: '2:1' },
      airTempC: 20,
      rhPct: 50,
    })
    expect(noPot.status).toBe(400)
    expect(noPot.body).toMatchObject({ issues: [{ path: 'revision.potLifeMinutes' }] })
    expect((await c.post('/api/spec-preview', { revisionId: 99_999_999, airTempC: 20, rhPct: 50 })).status).toBe(404)
  })
})

describe('spec sheets: event log', () => {
  it('keeps the hash chain intact across everything above', async () => {
    const verdict = await verifyChain(app.db)
    expect(verdict.intact).toBe(true)
    const types = await sql<{ type: string }>`SELECT DISTINCT type FROM event_log WHERE type LIKE 'spec.%'`.execute(app.db)
    expect(types.rows.map((r) => r.type).sort()).toEqual(
      expect.arrayContaining(['spec.product.created', 'spec.product.updated', 'spec.revision.created', 'spec.revision.frozen', 'spec.revision.updated', 'spec.tds.attached']),
    )
  })
})
