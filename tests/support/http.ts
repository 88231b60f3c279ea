// A tiny cookie-keeping HTTP client for API tests.
export interface ApiResponse<T = unknown> {
  status: number
  headers: Headers
  body: T
}

export class ApiClient {
  cookie = ''

  constructor(readonly baseUrl: string) {}

  async request<T = Record<string, unknown>>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<ApiResponse<T>> {
    const res = await fetch(this.baseUrl + path, {
      method,
      headers: {
        ...(body !== undefined ? { 'content-type': 'application/json' } : {}),
        ...(this.cookie ? { cookie: this.cookie } : {}),
        ...headers,
      },
      body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
      redirect: 'manual',
    })
    const setCookie = res.headers.getSetCookie()
    for (const c of setCookie) {
      const [pair] = c.split(';')
      if (pair?.startsWith('boothbeat-session=')) this.cookie = pair.endsWith('=') ? '' : pair
    }
    const text = await res.text()
    let parsed: unknown = text
    try {
      parsed = text ? JSON.parse(text) : null
    } catch {
      // not JSON: keep the text
    }
    return { status: res.status, headers: res.headers, body: parsed as T }
  }

  get<T = Record<string, unknown>>(path: string) {
    return this.request<T>('GET', path)
  }

  post<T = Record<string, unknown>>(path: string, body?: unknown, headers?: Record<string, string>) {
    return this.request<T>('POST', path, body ?? {}, headers)
  }

  patch<T = Record<string, unknown>>(path: string, body: unknown) {
    return this.request<T>('PATCH', path, body)
  }

  async login(email: string, password: string): Promise<ApiResponse> {
    const r = await this.post('/api/auth/login', { email, password })
    if (r.status !== 200) throw new Error(`login ${email} failed: ${r.status} ${JSON.stringify(r.body)}`)
    return r
  }
}
