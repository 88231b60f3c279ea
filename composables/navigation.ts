import type { Role } from '~/stores/session'

/** Where a role starts after sign-in: exports are the auditor's main page, the dashboard everyone else's. */
export function homeOf(role: Role): string {
  return role === 'auditor' ? '/evidence' : '/'
}

/** A same-site path to go to after sign-in (from `?next=`), else `home`. Refuses other sites. */
export function safeNext(v: unknown, home = '/'): string {
  const s = Array.isArray(v) ? v[0] : v
  if (typeof s !== 'string' || !s.startsWith('/') || s.startsWith('//') || s.startsWith('/\\')) return home
  if (s === '/login' || s.startsWith('/login?') || s.startsWith('/login/')) return home
  return s
}
