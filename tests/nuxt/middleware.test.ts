import { beforeEach, describe, expect, it, vi } from 'vitest'
import { mockNuxtImport, registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError } from 'h3'
import middleware from '~/middleware/auth.global'
import { homeOf, safeNext } from '~/composables/navigation'
import { useSessionStore } from '~/stores/session'
import { user } from './fixtures'

const { navigateToMock } = vi.hoisted(() => ({ navigateToMock: vi.fn((to: unknown) => to) }))
mockNuxtImport('navigateTo', () => navigateToMock)

let meCalls = 0
registerEndpoint('/api/me', () => {
  meCalls++
  throw createError({ statusCode: 401, message: 'Sign in first' })
})

function route(path: string, meta: Record<string, unknown> = {}, query: Record<string, string> = {}) {
  const qs = new URLSearchParams(query).toString()
  return { path, fullPath: qs ? `${path}?${qs}` : path, query, meta, params: {}, name: undefined, hash: '', matched: [], redirectedFrom: undefined } as never
}
const run = (to: unknown) => (middleware as unknown as (to: unknown, from: unknown) => Promise<unknown>)(to, route('/'))

describe('auth middleware', () => {
  beforeEach(() => {
    navigateToMock.mockClear()
    meCalls = 0
    const s = useSessionStore()
    s.user = null
    s.loaded = false
  })

  it('sends a signed-out visitor to /login with the way back', async () => {
    await run(route('/booths/2', {}, { range: '8h' }))
    expect(meCalls).toBe(1)
    expect(navigateToMock).toHaveBeenCalledWith({ path: '/login', query: { next: '/booths/2?range=8h' } }, { replace: true })
  })

  it('leaves the booth screen and the login page alone when signed out', async () => {
    expect(await run(route('/screen/pair'))).toBeUndefined()
    expect(meCalls).toBe(0)
    expect(await run(route('/login'))).toBeUndefined()
    expect(navigateToMock).not.toHaveBeenCalled()
  })

  it('holds a user who must change the password to /account/password', async () => {
    useSessionStore().setUser(user({ mustChangePassword: true }))
    await run(route('/'))
    expect(navigateToMock).toHaveBeenCalledWith('/account/password', { replace: true })
    navigateToMock.mockClear()
    expect(await run(route('/account/password'))).toBeUndefined()
    expect(navigateToMock).not.toHaveBeenCalled()
  })

  it('sends other roles to the friendly page, and lets the right role in', async () => {
    useSessionStore().setUser(user({ role: 'painter' }))
    await run(route('/admin/users', { roles: ['admin'] }))
    expect(navigateToMock).toHaveBeenCalledWith({ path: '/not-allowed', query: { from: '/admin/users' } }, { replace: true })
    navigateToMock.mockClear()
    useSessionStore().setUser(user({ role: 'admin' }))
    expect(await run(route('/admin/users', { roles: ['admin'] }))).toBeUndefined()
    expect(navigateToMock).not.toHaveBeenCalled()
  })

  it('sends a signed-in user away from /login to a safe next page', async () => {
    useSessionStore().setUser(user())
    await run(route('/login', {}, { next: '/booths/1' }))
    expect(navigateToMock).toHaveBeenCalledWith('/booths/1', { replace: true })
    expect(safeNext('//evil.example/x')).toBe('/')
    expect(safeNext('https://evil.example')).toBe('/')
    expect(safeNext('/login')).toBe('/')
  })

  it('lands an auditor on Evidence after sign-in, everyone else on the dashboard, unless a next page is asked', async () => {
    useSessionStore().setUser(user({ role: 'auditor' }))
    await run(route('/login'))
    expect(navigateToMock).toHaveBeenCalledWith('/evidence', { replace: true })
    navigateToMock.mockClear()
    await run(route('/login', {}, { next: '/event-log' }))
    expect(navigateToMock).toHaveBeenCalledWith('/event-log', { replace: true })
    expect(homeOf('manager')).toBe('/')
    expect(safeNext('//evil.example', homeOf('auditor'))).toBe('/evidence')
  })
})
