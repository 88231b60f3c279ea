import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { rmSync } from 'node:fs'
import pg from 'pg'
import { freePort } from '../../scripts/lib/ports'
import { restartPostgres, startPostgres, stopPostgres } from '../../scripts/lib/postgres'
import { startTestApp, type TestApp } from '../support/app'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'

// PostgreSQL stopped for 10 s in the middle of ingestion and started again: every reading that a
// device got a PUBACK for is stored, in memory first, then through the spool file.
let app: TestApp
let dataDir: string
let port: number
beforeAll(async () => {
  port = await freePort()
  dataDir = `.data/pg-outage-${process.pid}`
  const cluster = await startPostgres({ dataDir, port, database: 'postgres' })
  app = await startTestApp({ INGEST_BUFFER_MAX: '1000' }, { adminUrl: cluster.url })
}, 120_000)
afterAll(async () => {
  await app?.stop()
  await app?.db.destroy()
  stopPostgres(dataDir, 'immediate')
  rmSync(dataDir, { recursive: true, force: true })
  rmSync(`${dataDir}.password`, { force: true })
})

describe('a database outage during ingestion', () => {
  it('loses nothing: memory buffer, then spool, then drained in order', async () => {
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    const t0 = Date.now() - 60_000
    let sent = 0
    const publish = async (n: number) => {
      for (let i = 0; i < n; i++) {
        await c.publishAsync(topicOf('downdraft-1'), reading(t0 + sent * 10, { seq: sent }), { qos: 1 })
        sent++
      }
    }
    await publish(200)
    await waitUntil(async () => ((await (await fetch(`${app.url}/api/health`)).json()).ingestion.stored as number) >= 200)

    stopPostgres(dataDir, 'fast')
    const outageStarted = Date.now()
    // 2,500 readings while the database is away: more than the 1,000-row memory buffer.
    await publish(2_500)
    const during = await (await fetch(`${app.url}/api/health`)).json()
    expect(during.ingestion.backlog).toBeGreaterThan(1_000)
    expect(during.ingestion.spooled).toBeGreaterThan(0)
    expect(during.status).toBe('degraded')
    await new Promise((r) => setTimeout(r, Math.max(0, 10_000 - (Date.now() - outageStarted))))
    restartPostgres(dataDir, port)
    await publish(300)

    const check = new pg.Client({ connectionString: app.databaseUrl })
    await waitUntil(async () => {
      try {
        await check.connect().catch(() => undefined)
        const r = await check.query<{ n: number }>('SELECT count(*)::int AS n FROM readings')
        return r.rows[0]!.n === sent
      } catch {
        return false
      }
    }, 60_000, 250)
    const seqs = await check.query<{ seq: number }>('SELECT seq FROM readings ORDER BY ts')
    expect(seqs.rows.map((r) => r.seq)).toEqual(Array.from({ length: sent }, (_, i) => i))
    const after = await waitUntil(async () => {
      const h = await (await fetch(`${app.url}/api/health`)).json()
      return h.ingestion.backlog === 0 && h.status === 'ok' ? h : undefined
    }, 30_000)
    expect(after.ingestion.stored).toBe(sent)
    await check.end()
    await c.endAsync()
  })
})
