import { execFileSync, spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { freePort } from '../../scripts/lib/ports'

// Debian's Mosquitto on loopback for the scale tests: password file, ACL mirroring the embedded
// broker's rules, unlimited queue for slow subscribers (the default 1000 silently drops QoS 1).

export interface Mosquitto {
  url: string
  port: number
  appUser: { username: string; password: string }
  stop(): Promise<void>
}

const BIN = '/usr/sbin/mosquitto'

export function ensureMosquittoInstalled(): void {
  if (existsSync(BIN)) return
  if (process.getuid?.() !== 0) throw new Error('mosquitto is missing: apt-get install -y mosquitto')
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' })
  execFileSync('apt-get', ['install', '-y', '-qq', 'mosquitto'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
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
    [`listener ${port} 127.0.0.1`, 'allow_anonymous false', `password_file ${pw}`, `acl_file ${join(dir, 'acl')}`, 'max_queued_messages 0', 'persistence false', 'log_dest stderr', 'log_type error', ''].join('\n'),
  )
  if (process.getuid?.() === 0) execFileSync('chmod', ['-R', 'a+rX', dir])
  const child: ChildProcess = spawn(BIN, ['-c', join(dir, 'mosquitto.conf')], { stdio: ['ignore', 'ignore', 'pipe'] })
  let err = ''
  child.stderr?.on('data', (d: Buffer) => (err += d))
  // Wait for the port to accept connections.
  const net = await import('node:net')
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
    if (Date.now() > until || child.exitCode !== null) throw new Error(`mosquitto did not start: ${err}`)
    await new Promise((r) => setTimeout(r, 100))
  }
  return {
    url: `mqtt://127.0.0.1:${port}`,
    port,
    appUser,
    stop: () =>
      new Promise<void>((done) => {
        const finish = () => {
          rmSync(dir, { recursive: true, force: true })
          done()
        }
        if (child.exitCode !== null) return finish()
        child.once('exit', finish)
        child.kill('SIGTERM')
      }),
  }
}
