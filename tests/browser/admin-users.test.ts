import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { echoPageErrors, openBrowser, screenshot, signIn, type BrowserSession } from '../support/browser'

// The admin's journey: sign in, add a user on the Users page, and the new person signs in (in a browser of
// their own) with the temporary password, is made to choose a new one, and is then in; the old one no longer works.
let app: TestApp
let adminBrowser: BrowserSession
let newcomerBrowser: BrowserSession

const NEW_USER = { name: 'Ilse Marrowby', email: 'ilse.marrowby@larkspur.example', role: 'tech', roleLabel: 'Technician' }
const TEMPORARY = 'tmp-Larkspur-4821'
const CHOSEN = 'ladder quiet orchard 77'

beforeAll(async () => {
  // No booth data is needed: telemetry off, wait for the database only.
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  adminBrowser = await openBrowser({ width: 1400, height: 1000 })
  newcomerBrowser = await openBrowser({ width: 1280, height: 900 })
  echoPageErrors(adminBrowser.page, 'admin')
  echoPageErrors(newcomerBrowser.page, 'newcomer')
})

afterAll(async () => {
  await adminBrowser?.close()
  await newcomerBrowser?.close()
  await app?.close()
})

describe('admin: users', () => {
  it('signs in, adds a user with a temporary password, and sees the account listed as "Must change password"', async () => {
    const page = adminBrowser.page
    await signIn(page, app.url, 'admin@larkspur.example', DEMO_PASSWORD)
    await page.goto(`${app.url}/admin/users`)
    await page.getByRole('heading', { name: 'Users', level: 1 }).waitFor()
    await screenshot(page, 'admin-users-list')

    await page.getByRole('button', { name: 'Add a user' }).click()
    const form = page.locator('#create-user')
    await form.getByRole('heading', { name: 'New user' }).waitFor()
    // The form checks before it sends: an empty submit names each missing field.
    await form.getByRole('button', { name: 'Create account' }).click()
    await form.getByText('Enter a name').waitFor()
    await form.getByText('Enter an e-mail address').waitFor()

    await form.getByLabel('Name').fill(NEW_USER.name)
    await form.getByLabel('E-mail').fill(NEW_USER.email)
    await form.getByLabel('Role').selectOption({ label: NEW_USER.roleLabel })
    await form.getByLabel('Temporary password').fill(TEMPORARY)
    await screenshot(page, 'admin-users-new-filled')
    await form.getByRole('button', { name: 'Create account' }).click()

    const done = page.getByRole('status').filter({ hasText: 'can now sign in as' })
    await done.waitFor({ timeout: 15_000 })
    expect(await done.textContent()).toContain(`${NEW_USER.name} can now sign in as ${NEW_USER.email}`)
    const row = page.getByRole('row').filter({ hasText: NEW_USER.email })
    await row.waitFor()
    expect(await row.textContent()).toContain('Must change password')
    expect(await row.getByLabel(`Role of ${NEW_USER.name}`).inputValue()).toBe(NEW_USER.role)
    await screenshot(page, 'admin-users-created')

    const stored = await app.db.selectFrom('users').select(['name', 'role', 'must_change_password', 'disabled_at']).where('email', '=', NEW_USER.email).executeTakeFirstOrThrow()
    expect(stored).toMatchObject({ name: NEW_USER.name, role: NEW_USER.role, must_change_password: true, disabled_at: null })
    const created = await app.db.selectFrom('event_log').select(['type', 'actor_label']).where('type', '=', 'user.created').orderBy('seq', 'desc').executeTakeFirstOrThrow()
    expect(created.actor_label).toMatch(/\(admin\)$/)
  })

  it('the new user signs in with the temporary password, must choose a new one, and is then signed in', async () => {
    const page = newcomerBrowser.page
    await signIn(page, app.url, NEW_USER.email, TEMPORARY)
    // The temporary password leads to the change-password page, whatever was asked for.
    await page.waitForURL(`${app.url}/account/password`)
    await page.getByText('Choose a new password before you go on').waitFor()
    await page.goto(`${app.url}/bakes`)
    await page.waitForURL(`${app.url}/account/password`)
    await screenshot(page, 'new-user-must-change-password')

    await page.getByLabel('Current password').fill(TEMPORARY)
    await page.getByLabel('New password', { exact: true }).fill(CHOSEN)
    await page.getByLabel('New password again').fill(CHOSEN)
    await page.getByRole('button', { name: 'Change password' }).click()
    await page.waitForURL(`${app.url}/`)
    // Signed in as themselves: the user menu carries their name and role.
    const menu = page.getByRole('button', { name: new RegExp(NEW_USER.name) })
    await menu.waitFor()
    expect(await menu.textContent()).toContain(NEW_USER.roleLabel)
    // A tech may open the bakes page now.
    await page.goto(`${app.url}/bakes`)
    await page.getByRole('heading', { name: 'Bakes', level: 1 }).waitFor()
    await screenshot(page, 'new-user-signed-in')

    const stored = await app.db.selectFrom('users').select('must_change_password').where('email', '=', NEW_USER.email).executeTakeFirstOrThrow()
    expect(stored.must_change_password).toBe(false)
    // The temporary password is gone; the chosen one works.
    expect((await app.client().post('/api/auth/login', { email: NEW_USER.email, password: TEMPORARY })).status).toBe(401)
    expect((await app.client().post('/api/auth/login', { email: NEW_USER.email, password: CHOSEN })).status).toBe(200)
  })
})
