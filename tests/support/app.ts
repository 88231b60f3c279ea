import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { inject } from 'vitest'
import pg from 'pg'
import { Kysely } from 'kysely'
import { createDb, createPool } from '../../server/db/client'
import type { Database } from '../../server/db/database'
import { freePort, waitForHttp } from '../../scripts/lib/ports'
import { SERVER_ENTRY } from '../../scripts/lib/build'
import { ApiClient } from './http'

export const DEMO_PASSWORD = 'test-demo-password-42'
export const DEVICE_PASSWORD = 'test-device-password-42'

export interface TestApp {
  url: string
  mqttUrl: string
  mqttPort: number
  port: number
  databaseUrl: string
  databaseName: string
  db: Kysely<Database>
  pool: pg.Pool
  dir: string
  env: Record<string, string>
  logs(): string
  client(): ApiClient
  /** A client already signed in as one of the demo accounts (admin, manager, tech, painter, auditor). */
  as(local: string): Promise<ApiClient>
  stop(signal?: NodeJS.Signals): Promise<void>
  start(): Promise<void>
  close(): Promise<void>
}

function databaseUrlFor(adminUrl: string, name: string): string {
  const u = new URL(adminUrl)
  u.pathname = `/${name}`
  return u.toString()
}

/** A fresh database for one test file. */
export async function createTestDatabase(prefix = 'bb', adminUrl = inject('pgAdminUrl')): Promise<{ url: string; name: string; drop(): Promise<void> }> {
  const name = `${prefix}_${Date.now().toString(36)}_${Math.random().toString(36).slice(2, 8)}`
  const admin = new pg.Client({ connectionString: adminUrl })
  await admin.connect()
  await admin.query(`CREATE DATABASE ${name}`)
  await admin.end()
  return {
    url: databaseUrlFor(adminUrl, name),
    name,
    async drop() {
      const c = new pg.Client({ connectionString: adminUrl })
      await c.connect()
      await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`).catch(() => undefined)
      await c.end()
    },
  }
}

/**
 * Starts the built server (.output) as a child process on free ports against a fresh database,
 * with the demo seed, and waits until /api/health answers 200 (or until the database is up when
 * `waitFor` says so).
 */
export async function startTestApp(
  extraEnv: Record<string, string> = {},
  opts: { waitFor?: 'healthy' | 'http'; adminUrl?: string; shareDatabaseOf?: TestApp } = {},
): Promise<TestApp> {
  // A second instance of the same shop shares the first one's database (and leaves it in place).
  const database = opts.shareDatabaseOf
    ? { url: opts.shareDatabaseOf.databaseUrl, name: opts.shareDatabaseOf.databaseName, drop: async () => undefined }
    : await createTestDatabase('bb', opts.adminUrl)
  const port = await freePort()
  const mqttPort = await freePort()
  const dir = mkdtempSync(join(tmpdir(), 'boothbeat-test-'))
  const env: Record<string, string> = {
    PATH: process.env.PATH ?? '',
    HOME: process.env.HOME ?? '/root',
    NODE_ENV: 'production',
    HOST: '127.0.0.1',
    PORT: String(port),
    MQTT_PORT: String(mqttPort),
    DATABASE_URL: database.url,
    DATABASE_POOL_MAX: '5',
    NUXT_SESSION_PASSWORD: 'test-session-password-that-is-long-enough-0123456789',
    DEMO_SEED: '1',
    DEMO_PASSWORD,
    DEMO_DEVICE_PASSWORD: DEVICE_PASSWORD,
    INGEST_SPOOL_DIR: join(dir, 'spool'),
    UPLOAD_DIR: join(dir, 'uploads'),
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    SMTP_URL: 'smtp://127.0.0.1:9',
    ...extraEnv,
  }
  let child: ChildProcess | undefined
  let output = ''
  const pool = createPool(database.url, 3)
  const db = createDb(pool)
  const url = `http://127.0.0.1:${port}`

  const app: TestApp = {
    url,
    port,
    mqttPort,
    mqttUrl: `mqtt://127.0.0.1:${mqttPort}`,
    databaseUrl: database.url,
    databaseName: database.name,
    db,
    pool,
    dir,
    env,
    logs: () => output,
    client: () => new ApiClient(url),
    async as(local) {
      const c = new ApiClient(url)
      await c.login(`${local}@larkspur.example`, DEMO_PASSWORD)
      return c
    },
    async start() {
      child = spawn(process.execPath, [resolve(SERVER_ENTRY)], { env, stdio: ['ignore', 'pipe', 'pipe'] })
      child.stdout?.on('data', (d: Buffer) => (output += d.toString()))
      child.stderr?.on('data', (d: Buffer) => (output += d.toString()))
      try {
        if (opts.waitFor === 'http') {
          // Telemetry may be off on purpose: wait for the database (migrated and seeded) only.
          const until = Date.now() + 60_000
          for (;;) {
            const res = await waitForHttp(`${url}/api/health`, 60_000, [200, 503])
            const body = (await res.json()) as { database?: { up?: boolean } }
            if (body.database?.up) break
            if (Date.now() > until) throw new Error('database did not come up')
            await new Promise((r) => setTimeout(r, 200))
          }
        } else {
          await waitForHttp(`${url}/api/health`, 60_000, [200])
        }
      } catch (e) {
        throw new Error(`${e instanceof Error ? e.message : e}\n--- server output ---\n${output}`)
      }
    },
    async stop(signal = 'SIGTERM') {
      const c = child
      child = undefined
      if (!c || c.exitCode !== null) return
      await new Promise<void>((done) => {
        c.once('exit', () => done())
        c.kill(signal)
        setTimeout(() => c.kill('SIGKILL'), 10_000).unref()
      })
    },
    async close() {
      await app.stop()
      await db.destroy()
      await database.drop()
      rmSync(dir, { recursive: true, force: true })
    },
  }
  await app.start()
  return app
}
