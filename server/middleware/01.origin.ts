// Mutating requests from another site's page are refused (cross-site request forgery guard on top
// of SameSite=Lax cookies). Requests without an Origin header (scripts, devices) pass.
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (SAFE.has(event.method)) return
  const origin = getRequestHeader(event, 'origin')
  if (!origin) return
  const host = getRequestHeader(event, 'x-forwarded-host') ?? getRequestHeader(event, 'host')
  let originHost: string
  try {
    originHost = new URL(origin).host
  } catch {
    originHost = ''
  }
  if (!host || originHost !== host) {
    throw createError({ statusCode: 403, message: 'Requests from another site are refused' })
  }
})
