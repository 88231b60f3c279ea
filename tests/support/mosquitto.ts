import { execFileSync, spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { aptInstall } from '../../scripts/lib/apt'
import { freePort } from '../../scripts/lib/ports'

// Debian's Mosquitto on loopback for the scale tests: password file, ACL mirroring the embedded
// broker's rules, unlimited queue for slow subscribers (the default 1000 silently drops QoS 1), and
// persistence so the app's session (its subscriptions and queued messages) survives a restart.

export interface Mosquitto {
  url: string
  port: number
  appUser: { username: string; password: string }
  /** The broker's process id (for memory figures). */
  pid(): number | undefined
  /** Stops the broker process, leaving its configuration for start(). */
  kill(): Promise<void>
  /** Starts it again on the same port with the same configuration. */
  start(): Promise<void>
  stop(): Promise<void>
}

const BIN = '/usr/sbin/mosquitto'

export function ensureMosquittoInstalled(): void {
  if (existsSync(BIN)) return
  aptInstall(['mosquitto'])
}

export async function startMosquitto(devices: { id: string; site: string; booth: string; password: string }[]): Promise<Mosquitto> {
  ensureMosquittoInstalled()
  const dir = mkdtempSync(join(tmpdir(), 'boothbeat-mosquitto-'))
  const port = await freePort()
  const appUser = { username: 'boothbeat-app', password: 'app-password-for-tests' }
  const pw = join(dir, 'passwd')
  writeFileSync(pw, '')
  execFileSync('mosquitto_passwd', ['-b', pw, appUser.username, appUser.password])
  for (const d of devices) execFileSync('mosquitto_passwd', ['-b', pw, d.id, d.password])
  const acl = [`user ${appUser.username}`, 'topic read boothbeat/v1/#', '']
  for (const d of devices) {
    const base = `boothbeat/v1/${d.site}/${d.booth}`
    acl.push(`user ${d.id}`, `topic write ${base}/reading`, `topic write ${base}/mode`, `topic write ${base}/status`, `topic read ${base}/#`, '')
  }
  writeFileSync(join(dir, 'acl'), acl.join('\n'))
  writeFileSync(
    join(dir, 'mosquitto.conf'),
    [`listener ${port} 127.0.0.1`, 'allow_anonymous false', `password_file ${pw}`, `acl_file ${join(dir, 'acl')}`, 'max_queued_messages 0', 'persistence true', `persistence_location ${dir}/`, 'autosave_interval 1', 'log_dest stderr', 'log_type error', ''].join('\n'),
  )
  // Started as root, mosquitto drops to its own user, which must read the files and write the
  // persistence file.
  if (process.getuid?.() === 0) execFileSync('chown', ['-R', 'mosquitto', dir])
  let child: ChildProcess | undefined
  const net = await import('node:net')
  const start = async () => {
    const c = spawn(BIN, ['-c', join(dir, 'mosquitto.conf')], { stdio: ['ignore', 'ignore', 'pipe'] })
    child = c
    let err = ''
    c.stderr?.on('data', (d: Buffer) => (err += d))
    // Wait for the port to accept connections.
    const until = Date.now() + 10_000
    for (;;) {
      const ok = await new Promise<boolean>((res) => {
        const s = net.connect(port, '127.0.0.1', () => {
          s.end()
          res(true)
        })
        s.on('error', () => res(false))
      })
      if (ok) break
      if (Date.now() > until || c.exitCode !== null) throw new Error(`mosquitto did not start: ${err}`)
      await new Promise((r) => setTimeout(r, 100))
    }
  }
  const kill = () =>
    new Promise<void>((done) => {
      const c = child
      child = undefined
      if (!c || c.exitCode !== null) return done()
      c.once('exit', () => done())
      c.kill('SIGTERM')
    })
  await start()
  return {
    url: `mqtt://127.0.0.1:${port}`,
    port,
    appUser,
    pid: () => child?.pid,
    kill,
    start,
    stop: async () => {
      await kill()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}
