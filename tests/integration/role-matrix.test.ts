import { readdirSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import fc from 'fast-check'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/http'
import { startTestApp, type TestApp } from '../support/app'

// Every server route from the file tree against anonymous, each role and a paired booth screen.
// A route without an entry here fails the first test, so a new route must declare who may use it.
type Principal = 'anonymous' | 'admin' | 'manager' | 'tech' | 'painter' | 'auditor' | 'screen'
const ROLES = ['admin', 'manager', 'tech', 'painter', 'auditor'] as const
const STAFF = [...ROLES]
const RECORDERS = ['admin', 'manager', 'tech']
const MANAGERS = ['admin', 'manager']
const ACTORS = ['admin', 'manager', 'tech', 'painter']
const EVIDENCE = ['admin', 'manager', 'auditor']
const PUBLIC = 'public' as const

// Who may use each route. 'screen' is a paired booth screen (booth 1), with no user.
const MATRIX: Record<string, readonly string[] | typeof PUBLIC> = {
  'GET /api/health': PUBLIC,
  'POST /api/auth/login': PUBLIC,
  'POST /api/auth/logout': PUBLIC,
  'GET /api/me': STAFF,
  'POST /api/me/password': STAFF,
  'POST /api/me/pin': ACTORS,
  'GET /api/users': ['admin'],
  'POST /api/users': ['admin'],
  'PATCH /api/users/:id': ['admin'],
  'POST /api/users/:id/reset-password': ['admin'],
  'GET /api/booths': STAFF,
  'GET /api/booths/:id/readings': STAFF,
  'GET /api/booths/:id/live': [...STAFF, 'screen'],
  'GET /api/booths/:id/screen': [...STAFF, 'screen'],
  'GET /api/booths/:id/screen/stream': [...STAFF, 'screen'],
  'POST /api/booths/:id/pairing-codes': MANAGERS,
  'GET /api/booths/:id/counters': STAFF,
  'GET /api/booths/:id/history': STAFF,
  'GET /api/live': STAFF,
  'GET /api/screen/me': ['screen'],
  'POST /api/screen/pair': PUBLIC,
  'POST /api/screen/pin-check': ['screen'],
  'POST /api/screen/unpair': PUBLIC,
  'GET /api/products': STAFF,
  'POST /api/products': RECORDERS,
  'GET /api/products/:id': STAFF,
  'PATCH /api/products/:id': RECORDERS,
  'GET /api/products/:id/revisions': STAFF,
  'POST /api/products/:id/revisions': RECORDERS,
  'GET /api/spec-revisions/:id': STAFF,
  'PATCH /api/spec-revisions/:id': RECORDERS,
  'POST /api/spec-revisions/:id/freeze': RECORDERS,
  'POST /api/spec-revisions/:id/tds': RECORDERS,
  'POST /api/spec-preview': STAFF,
  'GET /api/files/:sha256': STAFF,
  'GET /api/jobs': STAFF,
  'POST /api/jobs': RECORDERS,
  'GET /api/jobs/plan-options': STAFF,
  'GET /api/jobs/:id': STAFF,
  'PATCH /api/jobs/:id': RECORDERS,
  'PUT /api/jobs/:id/steps': RECORDERS,
  'POST /api/coats': [...ACTORS, 'screen'],
  'POST /api/coats/:id/finish': [...ACTORS, 'screen'],
  'POST /api/mixes': [...ACTORS, 'screen'],
  'POST /api/mixes/:id/close': [...ACTORS, 'screen'],
  'GET /api/watches': STAFF,
  'GET /api/watches/:boothId': STAFF,
  'PUT /api/watches/:boothId': MANAGERS,
  'DELETE /api/watches/:boothId': MANAGERS,
  'GET /api/alerts': STAFF,
  'GET /api/alerts/:id': STAFF,
  'GET /api/alerts/summary': STAFF,
  'GET /api/alerts/stream': STAFF,
  'POST /api/alerts/:id/acknowledge': RECORDERS,
  'POST /api/alerts/:id/resolve': RECORDERS,
  'GET /api/mailbox': ['admin'],
  'GET /api/mailbox/:id': ['admin'],
  'GET /api/bakes': STAFF,
  'POST /api/bakes': RECORDERS,
  'GET /api/bakes/current': [...STAFF, 'screen'],
  'GET /api/bakes/:id': STAFF,
  'POST /api/bakes/:id/confirm': RECORDERS,
  'POST /api/bakes/:id/dismiss': RECORDERS,
  'POST /api/bakes/:id/end': RECORDERS,
  'POST /api/bakes/:id/sign-off': RECORDERS,
  'GET /api/calibrations': STAFF,
  'POST /api/calibrations': RECORDERS,
  'POST /api/maintenance/filter-changes': RECORDERS,
  'POST /api/maintenance/inspections': RECORDERS,
  'POST /api/maintenance/notes': RECORDERS,
  'GET /api/maintenance/reminders': STAFF,
  'GET /api/maintenance/rules': STAFF,
  'PUT /api/maintenance/rules': MANAGERS,
  'GET /api/event-log': EVIDENCE,
  'GET /api/event-log/verify': EVIDENCE,
  'GET /api/evidence/summary': EVIDENCE,
  'GET /api/evidence/pack': EVIDENCE,
  'GET /api/evidence/environment-log': EVIDENCE,
  'GET /api/exports': EVIDENCE,
  'GET /api/exports/:id': EVIDENCE,
}

// Query strings some routes need before they can say yes or no.
const QUERY: Record<string, string> = { 'GET /api/bakes/current': '?boothId=1' }

/** "METHOD /api/path/:param" for every file under server/api. */
function routesFromTree(root = 'server/api'): string[] {
  const out: string[] = []
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const p = join(dir, name)
      if (statSync(p).isDirectory()) walk(p)
      else if (name.endsWith('.ts')) {
        const m = /^(.*?)(?:\.(get|post|put|patch|delete))?\.ts$/.exec(relative(root, p))!
        const path = `/api/${m[1]!}`.replace(/\/index$/, '').replace(/\[([^\]]+)\]/g, ':$1')
        out.push(`${(m[2] ?? 'get').toUpperCase()} ${path}`)
      }
    }
  }
  walk(root)
  return out.sort()
}

let app: TestApp
const clients = new Map<Principal, ApiClient>()
beforeAll(async () => {
  app = await startTestApp({ MAILBOX_PAGE: '1' })
  clients.set('anonymous', app.client())
  for (const r of ROLES) clients.set(r, await app.as(r))
  const code = await clients.get('manager')!.post<{ code: string }>('/api/booths/1/pairing-codes')
  const screen = app.client()
  expect((await screen.post('/api/screen/pair', { code: code.body.code })).status).toBe(200)
  clients.set('screen', screen)
}, 120_000)
afterAll(async () => {
  await app?.close()
})

function concrete(route: string): { method: string; url: string } {
  const [method, path] = route.split(' ') as [string, string]
  const url = path
    .replace(':sha256', '0'.repeat(64))
    .replace(':boothId', '1')
    .replace(/:id(?=\/|$)/, path.startsWith('/api/booths/') ? '1' : '999999')
  return { method, url: url + (QUERY[route] ?? '') }
}

async function call(c: ApiClient, method: string, url: string, body?: unknown) {
  const ac = new AbortController()
  const res = await fetch(c.baseUrl + url, {
    method,
    headers: { ...(c.cookie ? { cookie: c.cookie } : {}), ...(method === 'GET' || method === 'DELETE' ? {} : { 'content-type': 'application/json' }) },
    body: method === 'GET' || method === 'DELETE' ? undefined : JSON.stringify(body ?? {}),
    signal: ac.signal,
  })
  const status = res.status
  // Streams (SSE, downloads) are judged by their status line; stop reading at once.
  ac.abort()
  return status
}

describe('the role matrix', () => {
  it('has an entry for every route in the file tree, and no entry without a route', () => {
    const routes = routesFromTree()
    expect(routes.filter((r) => !(r in MATRIX)), 'routes missing from the matrix').toEqual([])
    expect(Object.keys(MATRIX).filter((r) => !routes.includes(r)), 'matrix entries without a route').toEqual([])
  })

  it('answers 401 to anonymous, 403 to a role or screen not allowed, and neither to one allowed', async () => {
    const problems: string[] = []
    // Sign-out last: it ends the session the other checks use.
    const routes = routesFromTree().sort((a, b) => Number(a.includes('logout')) - Number(b.includes('logout')))
    for (const route of routes) {
      const allowed = MATRIX[route]!
      const { method, url } = concrete(route)
      for (const [who, client] of clients) {
        const status = await call(client, method, url)
        const ok = allowed === PUBLIC || allowed.includes(who)
        const expected = ok ? 'allowed' : who === 'anonymous' ? 401 : 403
        const good = ok ? status !== 401 && status !== 403 && status < 500 : status === expected
        if (!good) problems.push(`${route} as ${who}: ${status}, expected ${expected}`)
      }
    }
    expect(problems).toEqual([])
  })
})

describe('bad request bodies', () => {
  it('get a clear 4xx from every mutating route, never a crash, and the server stays healthy', async () => {
    const admin = await app.as('admin')
    const routes = routesFromTree().filter((r) => !r.startsWith('GET') && !r.includes('logout') && !r.includes('/screen/'))
    const crashes: string[] = []
    const body = fc.oneof(fc.jsonValue(), fc.dictionary(fc.string({ maxLength: 12 }), fc.oneof(fc.string(), fc.double(), fc.integer(), fc.boolean(), fc.constant(null))))
    for (const route of routes) {
      const { method, url } = concrete(route)
      const samples = fc.sample(body, { numRuns: 12, seed: 42 })
      for (const b of samples) {
        const status = await call(admin, method, url, b)
        if (status >= 500) crashes.push(`${route} ${JSON.stringify(b).slice(0, 80)} → ${status}`)
      }
      // Text that is not JSON at all.
      const res = await fetch(app.url + url, { method, headers: { cookie: admin.cookie, 'content-type': 'application/json' }, body: '{"unclosed": ' })
      if (res.status >= 500) crashes.push(`${route} broken JSON → ${res.status}`)
    }
    expect(crashes).toEqual([])
    expect((await fetch(`${app.url}/api/health`)).status).toBe(200)
  })
})
