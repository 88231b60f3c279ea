import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { appendEvent, verifyChain } from '../../server/domain/event-log'
import { startTestApp, type TestApp } from '../support/app'

let app: TestApp
beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  // Twelve events written concurrently: the chain must still be one unbroken line.
  await Promise.all(
    Array.from({ length: 12 }, (_, i) =>
      app.db.transaction().execute((tx) =>
        appendEvent(tx, { type: 'test.event', actor: { id: null, label: 'test' }, subject: { type: 'test', id: i }, data: { i, note: `event ${i}` } }),
      ),
    ),
  )
})
afterAll(async () => {
  await app?.close()
})

describe('the event log', () => {
  it('chains concurrent appends without gaps', async () => {
    const v = await verifyChain(app.db)
    expect(v.intact).toBe(true)
    const rows = await app.db.selectFrom('event_log').select(['seq', 'prev_hash', 'hash']).orderBy('seq').execute()
    const mine = rows.slice(-12)
    for (let i = 1; i < mine.length; i++) expect(mine[i]!.prev_hash).toBe(mine[i - 1]!.hash)
    expect(rows.map((r) => r.seq)).toEqual(rows.map((_, i) => i + 1))
  })

  it('refuses UPDATE and DELETE', async () => {
    await expect(sql`UPDATE event_log SET type = 'x' WHERE seq = 1`.execute(app.db)).rejects.toThrow(/append-only/)
    await expect(sql`DELETE FROM event_log WHERE seq = 1`.execute(app.db)).rejects.toThrow(/append-only/)
  })

  it('reports the first broken link when someone with owner rights changes a row', async () => {
    const rows = await app.db.selectFrom('event_log').select('seq').orderBy('seq').execute()
    const target = rows[Math.floor(rows.length / 2)]!.seq
    await sql`ALTER TABLE event_log DISABLE TRIGGER event_log_append_only`.execute(app.db)
    await sql`UPDATE event_log SET payload = ${'{"i":999}'} WHERE seq = ${target}`.execute(app.db)
    await sql`ALTER TABLE event_log ENABLE TRIGGER event_log_append_only`.execute(app.db)
    const v = await verifyChain(app.db, 3)
    expect(v).toMatchObject({ intact: false, brokenAt: target, reason: expect.stringMatching(/changed/) })
    const auditor = await app.as('auditor')
    const r = await auditor.get('/api/event-log/verify')
    expect(r.body).toMatchObject({ intact: false, brokenAt: target })
  })

  it('lets auditors and managers read it, not painters', async () => {
    expect((await (await app.as('painter')).get('/api/event-log')).status).toBe(403)
    const r = await (await app.as('auditor')).get<{ events: { type: string }[] }>('/api/event-log?type=test.')
    expect(r.status).toBe(200)
    expect(r.body.events.length).toBe(12)
  })
})
