import { spawn, type ChildProcess } from 'node:child_process'
import { appendFileSync, readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { SERVER_ENTRY } from '../../scripts/lib/build'
import { waitForHttp } from '../../scripts/lib/ports'

export interface AppProcess {
  child: ChildProcess
  url: string
  /** Current and peak resident memory, MiB (Linux /proc). */
  memory(): { rssMiB: number; peakMiB: number }
  stop(): Promise<void>
}

export function memoryOf(pid: number): { rssMiB: number; peakMiB: number } {
  try {
    const s = readFileSync(`/proc/${pid}/status`, 'utf8')
    const kb = (k: string) => Number(new RegExp(`${k}:\\s+(\\d+)`).exec(s)?.[1] ?? 0)
    return { rssMiB: kb('VmRSS') / 1024, peakMiB: kb('VmHWM') / 1024 }
  } catch {
    return { rssMiB: NaN, peakMiB: NaN }
  }
}

export async function startAppProcess(env: Record<string, string>, port: number): Promise<AppProcess> {
  const child = spawn(process.execPath, [...(process.env.BENCH_PROFILE ? ['--cpu-prof', '--cpu-prof-dir=/tmp/prof'] : []), ...(process.env.BENCH_NODE_FLAGS?.split(' ').filter(Boolean) ?? []), resolve(SERVER_ENTRY)], { env: { ...process.env, ...env, PORT: String(port), HOST: '127.0.0.1', NODE_ENV: 'production' }, stdio: ['ignore', 'pipe', 'pipe'] })
  let out = ''
  // BENCH_SERVER_LOG=file keeps the server's output (e.g. with BENCH_NODE_FLAGS=--trace-gc) for a closer look.
  const log = process.env.BENCH_SERVER_LOG
  const keep = (d: Buffer) => {
    out += d
    if (log) appendFileSync(log, d)
  }
  child.stdout?.on('data', keep)
  child.stderr?.on('data', keep)
  const url = `http://127.0.0.1:${port}`
  try {
    await waitForHttp(`${url}/api/health`, 90_000)
  } catch (e) {
    child.kill('SIGKILL')
    throw new Error(`${e instanceof Error ? e.message : e}\n${out}`)
  }
  return {
    child,
    url,
    memory: () => memoryOf(child.pid!),
    stop: () =>
      new Promise<void>((done) => {
        if (child.exitCode !== null) return done()
        child.once('exit', () => done())
        child.kill('SIGTERM')
      }),
  }
}
