// One reading of an API failure, whatever threw it ($fetch's FetchError, a network failure).
// Server error bodies are `{ statusCode, message, issues?: { path, message }[] }`.

export interface FieldIssue {
  path: string
  message: string
}

export interface ApiFailure {
  /** HTTP status; 0 when the server was not reached. */
  status: number
  message: string
  issues: FieldIssue[]
  /** Seconds from a Retry-After header (or the body), when the server sent one. */
  retryAfter: number | null
}

interface FetchErrorLike {
  status?: number
  statusCode?: number
  data?: unknown
  response?: { status?: number; headers?: { get(name: string): string | null } }
  message?: string
}

function parseRetryAfter(v: string | null | undefined): number | null {
  if (!v) return null
  const n = Number(v)
  if (Number.isFinite(n) && n >= 0) return Math.ceil(n)
  const at = Date.parse(v)
  return Number.isFinite(at) ? Math.max(0, Math.ceil((at - Date.now()) / 1000)) : null
}

export function apiFailure(e: unknown): ApiFailure {
  const err = (e ?? {}) as FetchErrorLike
  const status = err.response?.status ?? err.status ?? err.statusCode ?? 0
  const body = (err.data && typeof err.data === 'object' ? err.data : {}) as { message?: unknown; issues?: unknown; data?: { retryAfter?: unknown } }
  const issues = Array.isArray(body.issues)
    ? body.issues.filter((i): i is FieldIssue => !!i && typeof i.path === 'string' && typeof i.message === 'string')
    : []
  let retryAfter = parseRetryAfter(err.response?.headers?.get('retry-after'))
  if (retryAfter === null && typeof body.data?.retryAfter === 'number') retryAfter = body.data.retryAfter
  let message = typeof body.message === 'string' && body.message ? body.message : ''
  if (!message) {
    if (status === 0) message = 'Boothbeat could not be reached. Check the network and try again.'
    else if (status >= 500) message = 'Something went wrong on the server. Try again in a moment.'
    else message = err.message || `The request failed (${status}).`
  }
  return { status, message, issues, retryAfter }
}

/** Issues as a field → message map (first message per field wins). */
export function issuesByField(issues: FieldIssue[]): Record<string, string> {
  const out: Record<string, string> = {}
  for (const i of issues) {
    const key = i.path || '_'
    out[key] ??= i.message
  }
  return out
}

/** "14 min 5 s", "40 s", "2 h 3 min" for a wait in seconds. */
export function formatWait(seconds: number): string {
  const s = Math.max(0, Math.ceil(seconds))
  if (s < 60) return `${s} s`
  const h = Math.floor(s / 3600)
  const m = Math.floor((s % 3600) / 60)
  const r = s % 60
  if (h > 0) return m ? `${h} h ${m} min` : `${h} h`
  return r ? `${m} min ${r} s` : `${m} min`
}
