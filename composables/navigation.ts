/** A same-site path to go to after sign-in (from `?next=`), else '/'. Refuses other sites. */
export function safeNext(v: unknown): string {
  const s = Array.isArray(v) ? v[0] : v
  if (typeof s !== 'string' || !s.startsWith('/') || s.startsWith('//') || s.startsWith('/\\')) return '/'
  if (s === '/login' || s.startsWith('/login?') || s.startsWith('/login/')) return '/'
  return s
}
