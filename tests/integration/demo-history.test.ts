import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HISTORY_JOB, seedFinishedJob } from '../../scripts/lib/demo-history'
import { DEMO_PASSWORD, startTestApp, type TestApp } from '../support/app'

// The demo's finished job (what an auditor exports on the first day) is made through the real API as the demo
// users: if a rule of the coats, the bakes or the jobs changes so that the demo history no longer passes, this
// fails here instead of in the demo.
let app: TestApp

beforeAll(async () => {
  app = await startTestApp()
}, 120_000)

afterAll(async () => {
  await app?.close()
})

describe('the demo history', () => {
  it('creates a finished job whose coats followed the data sheet, with a signed-off bake; once only', async () => {
    const lines: string[] = []
    expect(await seedFinishedJob({ baseUrl: app.url, databaseUrl: app.databaseUrl, password: DEMO_PASSWORD, log: (l) => lines.push(l) })).toBe(HISTORY_JOB)
    expect(lines.join('\n')).toMatch(/readings of downdraft-2/)

    const job = await app.db.selectFrom('jobs').selectAll().where('number', '=', HISTORY_JOB).executeTakeFirstOrThrow()
    expect(job.status).toBe('done')
    const coats = await app.db.selectFrom('coats').selectAll().where('job_id', '=', job.id).orderBy('started_at').execute()
    expect(coats).toHaveLength(4)
    // Every coat after the first waited its flash: no guard rail was passed, so no override reason was needed.
    expect(coats.flatMap((c) => c.overrides)).toEqual([])
    expect(coats.slice(1).map((c) => c.start_check.flash?.ready)).toEqual([true, true, true])

    const bake = await app.db
      .selectFrom('bakes')
      .innerJoin('bake_jobs', 'bake_jobs.bake_id', 'bakes.id')
      .select(['bakes.state', 'bakes.ended_at'])
      .where('bake_jobs.job_id', '=', job.id)
      .executeTakeFirstOrThrow()
    expect(bake.state).toBe('signed_off')
    expect(bake.ended_at!.getTime()).toBeLessThan(Date.now())

    // The readings end before now, and a second run leaves everything as it is.
    const { n } = await app.db.selectFrom('readings').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    expect(Number(n)).toBeGreaterThan(10_000)
    expect(await seedFinishedJob({ baseUrl: app.url, databaseUrl: app.databaseUrl, password: DEMO_PASSWORD })).toBeNull()
    expect((await app.db.selectFrom('coats').select('id').where('job_id', '=', job.id).execute()).length).toBe(4)
  }, 120_000)
})
