import { createServer } from 'node:net'

// Ports this process has handed out: the kernel may give the same free port to two calls in a row (nothing
// is bound to it between them), and two servers of one test or benchmark would then collide.
const handedOut = new Set<number>()

function askKernel(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer()
    srv.once('error', reject)
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address()
      const port = typeof addr === 'object' && addr ? addr.port : 0
      srv.close(() => resolve(port))
    })
  })
}

/** A loopback port that is free now and that this process has not handed out before. */
export async function freePort(): Promise<number> {
  for (let i = 0; i < 50; i++) {
    const port = await askKernel()
    if (!handedOut.has(port)) {
      handedOut.add(port)
      return port
    }
  }
  throw new Error('no free loopback port that was not already handed out')
}

/** Polls a URL until it answers with one of `ok` statuses, or throws after `timeoutMs`. */
export async function waitForHttp(url: string, timeoutMs = 60_000, ok: number[] = [200]): Promise<Response> {
  const until = Date.now() + timeoutMs
  let last = ''
  while (Date.now() < until) {
    try {
      const res = await fetch(url)
      if (ok.includes(res.status)) return res
      last = `HTTP ${res.status}: ${(await res.text()).slice(0, 300)}`
    } catch (e) {
      last = e instanceof Error ? e.message : String(e)
    }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`${url} did not become ready in ${timeoutMs} ms (${last})`)
}
