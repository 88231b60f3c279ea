// Sign-in and role routing (user experience only: the server checks every request itself).
//   signed out → /login?next=…   (the booth screen, /screen/**, has its own pairing flow)
//   must change password → /account/password
//   page meta `roles` (definePageMeta({ roles: ['admin'] })) not matching → /not-allowed
import type { Role } from '~/stores/session'
import { useSessionStore } from '~/stores/session'
import { homeOf, safeNext } from '~/composables/navigation'

declare module '#app' {
  interface PageMeta {
    /** Roles that may open the page; none = every signed-in role. */
    roles?: readonly Role[]
    /** Reachable without signing in. */
    public?: boolean
  }
}

declare module 'vue-router' {
  interface RouteMeta {
    roles?: readonly Role[]
    public?: boolean
  }
}

export default defineNuxtRouteMiddleware(async (to) => {
  if (to.path === '/screen' || to.path.startsWith('/screen/')) return

  const session = useSessionStore()
  if (!session.loaded) await session.fetchMe()
  const user = session.user

  if (to.path === '/login') {
    if (user) return navigateTo(user.mustChangePassword ? '/account/password' : safeNext(to.query.next, homeOf(user.role)), { replace: true })
    return
  }
  if (to.meta.public) return

  if (!user) {
    return navigateTo({ path: '/login', query: to.fullPath !== '/' ? { next: to.fullPath } : {} }, { replace: true })
  }
  if (user.mustChangePassword && to.path !== '/account/password') {
    return navigateTo('/account/password', { replace: true })
  }
  const roles = to.meta.roles
  if (roles && roles.length && !roles.includes(user.role)) {
    return navigateTo({ path: '/not-allowed', query: { from: to.fullPath } }, { replace: true })
  }
})
