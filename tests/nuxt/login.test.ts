import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import { readBody, setResponseHeader, setResponseStatus } from 'h3'
import LoginPage from '~/pages/login.vue'
import { useSessionStore } from '~/stores/session'

type Reply = { status: number; body: unknown; headers?: Record<string, string> }
let reply: Reply = { status: 500, body: {} }
let calls: unknown[] = []

registerEndpoint('/api/auth/login', {
  method: 'POST',
  handler: async (event) => {
    calls.push(await readBody(event))
    setResponseStatus(event, reply.status)
    for (const [k, v] of Object.entries(reply.headers ?? {})) setResponseHeader(event, k, v)
    return reply.body
  },
})

async function signIn(email: string, password: string) {
  const w = await mountSuspended(LoginPage, { route: '/login' })
  await w.find('#login-email').setValue(email)
  await w.find('#login-password').setValue(password)
  await w.find('form').trigger('submit')
  await flushPromises()
  await new Promise((r) => setTimeout(r, 20))
  await flushPromises()
  return w
}

describe('login page', () => {
  afterEach(() => {
    calls = []
    useSessionStore().setUser(null)
  })

  it('has a labelled e-mail and password field', async () => {
    const w = await mountSuspended(LoginPage, { route: '/login' })
    expect(w.find('label[for="login-email"]').text()).toBe('E-mail')
    expect(w.find('label[for="login-password"]').text()).toBe('Password')
    expect(w.find('[data-testid="login-error"]').exists()).toBe(false)
  })

  it('asks for missing fields without calling the server', async () => {
    const w = await signIn('', '')
    expect(calls).toHaveLength(0)
    expect(w.find('#login-email-error').text()).toBe('Enter your e-mail address')
    expect(w.find('#login-password-error').text()).toBe('Enter your password')
    expect(w.find('#login-email').attributes('aria-invalid')).toBe('true')
  })

  it('says so on 401 and empties the password', async () => {
    reply = { status: 401, body: { statusCode: 401, message: 'E-mail or password is not right' } }
    const w = await signIn('painter@larkspur.example', 'wrong-password')
    expect(calls).toEqual([{ email: 'painter@larkspur.example', password: 'wrong-password' }])
    const err = w.find('[data-testid="login-error"]')
    expect(err.exists()).toBe(true)
    expect(err.attributes('role')).toBe('alert')
    expect(err.text()).toContain('The e-mail or the password is not right')
    expect((w.find('#login-password').element as HTMLInputElement).value).toBe('')
    expect(useSessionStore().signedIn).toBe(false)
  })

  it('shows the wait from Retry-After on 429 and holds the button', async () => {
    reply = { status: 429, body: { statusCode: 429, message: 'Too many attempts. Try again in 840 s.' }, headers: { 'retry-after': '840' } }
    const w = await signIn('painter@larkspur.example', 'wrong-password')
    const err = w.find('[data-testid="login-error"]')
    expect(err.text()).toContain('Too many sign-in attempts')
    expect(err.text()).toMatch(/Try again in 1[34] min/)
    const button = w.find('button[type="submit"]')
    expect(button.attributes('disabled')).toBeDefined()
    expect(button.text()).toMatch(/^Wait 1[34] min/)
  })

  it('shows field messages from the issues list on 400', async () => {
    reply = { status: 400, body: { statusCode: 400, message: 'Some fields need attention', issues: [{ path: 'email', message: 'Enter a valid e-mail address' }] } }
    const w = await signIn('someone@somewhere', 'x')
    expect(w.find('#login-email-error').text()).toBe('Enter a valid e-mail address')
  })

  it('signs in and keeps the user', async () => {
    reply = {
      status: 200,
      body: { user: { id: 4, email: 'painter@larkspur.example', name: 'Pat Painter', role: 'painter', mustChangePassword: false, disabled: false, hasPin: true, prefs: {} } },
    }
    const w = await signIn('painter@larkspur.example', 'right-password')
    expect(w.find('[data-testid="login-error"]').exists()).toBe(false)
    expect(useSessionStore().user?.name).toBe('Pat Painter')
  })
})
