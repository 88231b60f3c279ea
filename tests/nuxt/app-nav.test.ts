import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import AppNav from '~/components/AppNav.vue'
import { useSessionStore } from '~/stores/session'
import { user } from './fixtures'

async function linksFor(role: 'admin' | 'painter') {
  useSessionStore().setUser(user({ role }))
  const w = await mountSuspended(AppNav, { route: false })
  return w.findAll('a').map((a) => ({ label: a.text(), href: a.attributes('href')! }))
}

describe('AppNav', () => {
  it('lists pages by role and hides the ones not built yet', async () => {
    const router = useRouter()
    const admin = await linksFor('admin')
    expect(admin.slice(0, 1)).toEqual([{ label: 'Dashboard', href: '/' }])
    expect(admin).toContainEqual({ label: 'Users', href: '/admin/users' })
    for (const l of admin) expect(router.resolve(l.href).matched.length, l.href).toBeGreaterThan(0)

    const painter = await linksFor('painter')
    expect(painter).toContainEqual({ label: 'Dashboard', href: '/' })
    expect(painter.map((l) => l.label)).not.toContain('Users')
  })
})
