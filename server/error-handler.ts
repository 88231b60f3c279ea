import type { NitroErrorHandler } from 'nitropack'
import { getRequestURL, send, setResponseHeader, setResponseStatus } from 'h3'

// API errors leave as `{ statusCode, message, issues? }` and never carry a stack trace; pages fall
// through to Nuxt's own error page (the next handler in the chain).
const apiErrorHandler: NitroErrorHandler = (error, event) => {
  const path = getRequestURL(event).pathname
  if (!path.startsWith('/api/')) return
  const statusCode = error.statusCode || 500
  const issues = (error.data as { issues?: unknown } | undefined)?.issues
  // An exception we did not raise ourselves says nothing to the client.
  const internal = error.unhandled || !error.message
  const message = internal ? 'Something went wrong on the server' : error.message || error.statusMessage || 'Error'
  if (statusCode >= 500) console.error(`[api] ${event.method} ${path}:`, error.cause ?? error)
  const body: Record<string, unknown> = { statusCode, message }
  if (Array.isArray(issues)) body.issues = issues
  setResponseStatus(event, statusCode)
  setResponseHeader(event, 'content-type', 'application/json')
  const retryAfter = (error.data as { retryAfter?: number } | undefined)?.retryAfter
  if (retryAfter) setResponseHeader(event, 'retry-after', retryAfter)
  return send(event, JSON.stringify(body))
}

export default apiErrorHandler
