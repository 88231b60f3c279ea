import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'

let app: TestApp
beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
})
afterAll(async () => {
  await app?.close()
})

describe('sign-in', () => {
  it('accepts the right password and sets a HttpOnly, SameSite=Lax cookie, not Secure over plain HTTP', async () => {
    const res = await fetch(`${app.url}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'Manager@Larkspur.example', password: DEMO_PASSWORD }),
    })
    expect(res.status).toBe(200)
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('boothbeat-session='))!
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).not.toMatch(/Secure/i)
    const body = (await res.json()) as { user: { role: string; email: string } }
    expect(body.user).toMatchObject({ role: 'manager', email: 'manager@larkspur.example' })
  })

  it('marks the cookie Secure when the request came over HTTPS through a proxy', async () => {
    const res = await fetch(`${app.url}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'x-forwarded-proto': 'https' },
      body: JSON.stringify({ email: 'tech@larkspur.example', password: DEMO_PASSWORD }),
    })
    expect(res.status).toBe(200)
    expect(res.headers.getSetCookie().find((c) => c.startsWith('boothbeat-session='))).toMatch(/Secure/i)
  })

  it('answers 401 to a wrong password and to an unknown account, in the same timing class', async () => {
    const c = app.client()
    const time = async (email: string) => {
      const t0 = performance.now()
      const r = await c.post('/api/auth/login', { email, password: 'wrong-password-123' })
      return { status: r.status, ms: performance.now() - t0, body: r.body }
    }
    // Warm up once (the dummy hash is made on first use), then compare medians.
    await time('nobody@larkspur.example')
    const known: number[] = []
    const unknown: number[] = []
    for (let i = 0; i < 3; i++) {
      const k = await time('painter@larkspur.example')
      const u = await time(`ghost${i}@larkspur.example`)
      expect(k.status).toBe(401)
      expect(u.status).toBe(401)
      expect(u.body).toEqual(k.body)
      known.push(k.ms)
      unknown.push(u.ms)
    }
    const median = (xs: number[]) => xs.sort((a, b) => a - b)[1]!
    const ratio = median(unknown) / median(known)
    // Both pay for one scrypt check; an unknown account that skipped it would answer many times faster.
    expect(ratio).toBeGreaterThan(0.4)
    expect(ratio).toBeLessThan(2.5)
  })

  it('rate-limits repeated failures for one account with 429 and Retry-After', async () => {
    const admin = await app.as('admin')
    await admin.post('/api/users', { email: 'lockme@larkspur.example', name: 'Lock Me', role: 'auditor', password: 'lockme-password-1' })
    const c = app.client()
    const statuses: number[] = []
    let retryAfter: string | null = null
    for (let i = 0; i < 7; i++) {
      const r = await c.post('/api/auth/login', { email: 'lockme@larkspur.example', password: `wrong-${i}-password` })
      statuses.push(r.status)
      if (r.status === 429) retryAfter = r.headers.get('retry-after')
    }
    expect(statuses.slice(0, 4)).toEqual([401, 401, 401, 401])
    expect(statuses.at(-1)).toBe(429)
    expect(Number(retryAfter)).toBeGreaterThan(0)
    // Even the right password is refused while locked.
    const locked = await c.post('/api/auth/login', { email: 'lockme@larkspur.example', password: 'lockme-password-1' })
    expect(locked.status).toBe(429)
  })

  it('returns field problems in the stable error shape', async () => {
    const r = await app.client().post('/api/auth/login', { email: 'not-an-email' })
    expect(r.status).toBe(400)
    expect(r.body).toEqual({
      statusCode: 400,
      message: expect.any(String),
      issues: expect.arrayContaining([expect.objectContaining({ path: 'email' }), expect.objectContaining({ path: 'password' })]),
    })
    const broken = await app.client().request('POST', '/api/auth/login', '{"email":', { 'content-type': 'application/json' })
    expect(broken.status).toBe(400)
    expect(broken.body).toMatchObject({ statusCode: 400 })
    expect(JSON.stringify(broken.body)).not.toMatch(/at \w+ \(|node_modules/)
  })

  it('refuses a mutating request from a foreign Origin', async () => {
    const r = await app.client().post('/api/auth/login', { email: 'admin@larkspur.example', password: DEMO_PASSWORD }, { origin: 'http://elsewhere.example' })
    expect(r.status).toBe(403)
    const same = await app.client().post('/api/auth/login', { email: 'admin@larkspur.example', password: DEMO_PASSWORD }, { origin: app.url })
    expect(same.status).toBe(200)
  })

  it('signs out', async () => {
    const c = await app.as('painter')
    expect((await c.get('/api/me')).status).toBe(200)
    await c.post('/api/auth/logout')
    expect((await c.get('/api/me')).status).toBe(401)
  })
})

describe('roles and accounts', () => {
  it('lets each role reach only what it may (401 anonymous, 403 wrong role)', async () => {
    expect((await app.client().get('/api/users')).status).toBe(401)
    expect((await app.client().get('/api/booths')).status).toBe(401)
    for (const role of ['manager', 'tech', 'painter', 'auditor']) {
      const c = await app.as(role)
      expect((await c.get('/api/users')).status, role).toBe(403)
      expect((await c.get('/api/booths')).status, role).toBe(200)
    }
    const admin = await app.as('admin')
    expect((await admin.get('/api/users')).status).toBe(200)
  })

  it('makes a created user change the password at first sign-in', async () => {
    const admin = await app.as('admin')
    const created = await admin.post('/api/users', { email: 'new.painter@larkspur.example', name: 'Ren Okafor', role: 'painter', password: 'temporary-pass-1' })
    expect(created.status).toBe(201)
    const u = app.client()
    const login = await u.login('new.painter@larkspur.example', 'temporary-pass-1')
    expect((login.body as { user: { mustChangePassword: boolean } }).user.mustChangePassword).toBe(true)
    expect((await u.get('/api/booths')).status).toBe(403)
    expect((await u.get('/api/me')).status).toBe(200)
    const short = await u.post('/api/me/password', { current: 'temporary-pass-1', next: 'short' })
    expect(short.status).toBe(400)
    const changed = await u.post('/api/me/password', { current: 'temporary-pass-1', next: 'my-own-password-9' })
    expect(changed.status).toBe(200)
    expect((await u.get('/api/booths')).status).toBe(200)
    // The temporary password no longer works.
    expect((await app.client().post('/api/auth/login', { email: 'new.painter@larkspur.example', password: 'temporary-pass-1' })).status).toBe(401)
  })

  it('refuses a disabled account at sign-in and on an existing session', async () => {
    const admin = await app.as('admin')
    await admin.post('/api/users', { email: 'leaver@larkspur.example', name: 'Ash Leaver', role: 'tech', password: 'temporary-pass-2' })
    const u = app.client()
    await u.login('leaver@larkspur.example', 'temporary-pass-2')
    await u.post('/api/me/password', { current: 'temporary-pass-2', next: 'leaver-password-2' })
    expect((await u.get('/api/booths')).status).toBe(200)
    const list = (await admin.get<{ users: { id: number; email: string }[] }>('/api/users')).body.users
    const id = list.find((x) => x.email === 'leaver@larkspur.example')!.id
    expect((await admin.patch(`/api/users/${id}`, { disabled: true })).status).toBe(200)
    expect((await u.get('/api/booths')).status).toBe(401)
    expect((await app.client().post('/api/auth/login', { email: 'leaver@larkspur.example', password: 'leaver-password-2' })).status).toBe(401)
  })

  it('refuses a duplicate e-mail and an admin disabling themself', async () => {
    const admin = await app.as('admin')
    const dup = await admin.post('/api/users', { email: 'manager@larkspur.example', name: 'Copy', role: 'manager', password: 'temporary-pass-3' })
    expect(dup.status).toBe(409)
    const me = (await admin.get<{ user: { id: number } }>('/api/me')).body.user
    expect((await admin.patch(`/api/users/${me.id}`, { disabled: true })).status).toBe(400)
  })
})

describe('account changes in the event log', () => {
  it('records user creation and role changes with the admin as actor', async () => {
    const admin = await app.as('admin')
    const created = await admin.post<{ user: { id: number } }>('/api/users', { email: 'logged@larkspur.example', name: 'Kit Logged', role: 'painter', password: 'temporary-pass-9' })
    await admin.patch(`/api/users/${created.body.user.id}`, { role: 'tech' })
    const events = await app.db.selectFrom('event_log').selectAll().where('subject_type', '=', 'user').where('subject_id', '=', String(created.body.user.id)).orderBy('seq').execute()
    expect(events.map((e) => e.type)).toEqual(['user.created', 'user.role_changed'])
    expect(events[1]!.actor_label).toMatch(/\(admin\)$/)
    expect(JSON.parse(events[1]!.payload)).toMatchObject({ roleBefore: 'painter', roleAfter: 'tech' })
  })
})
