import pg from 'pg'
import { roundTo } from '../../shared/specs/units'
import { dewPointC } from '../../shared/cure/psychrometrics'
import { planMinutes, simulatePlannedCycle, type PlannedSegment } from '../../simulator/past-cycle'
import { ensurePartitions } from '../../server/telemetry/partitions'
import { insertReadingBatch } from '../../server/telemetry/insert-batch'
import type { ReadingRow } from '../../server/telemetry/reading-row'

// A finished job in the demo's recent past, so an auditor has something to export on the first day: two coats of
// basecoat and two of clearcoat in Downdraft booth 2, then a bake, over about three hours that ended a few minutes
// before the demo started. The booth's readings come from the simulator run at real time and go straight into the
// readings table (the broker refuses readings hours old); everything people do goes through the API as the demo
// users, so the event log, the coat checks and the bake record are the real ones.

export const HISTORY_JOB = 'RO-24109'
const BOOTH = 'downdraft-2'
const SEED = 'larkspur-history'
// The painter's day on this job, as the booth controller saw it: flash times are the ones the demo data sheets ask
// for at about 20 °C and 55 %RH, with a little to spare (basecoat to clearcoat: until the base is fully matt).
const PLAN: PlannedSegment[] = [
  { mode: 'idle', minutes: 10 },
  { mode: 'spray', minutes: 6 }, // basecoat 1
  { mode: 'flash', minutes: 8 },
  { mode: 'spray', minutes: 5 }, // basecoat 2
  { mode: 'flash', minutes: 25 },
  { mode: 'spray', minutes: 6 }, // clearcoat 1
  { mode: 'flash', minutes: 10 },
  { mode: 'spray', minutes: 6 }, // clearcoat 2
  { mode: 'flash', minutes: 15 },
  { mode: 'bake', minutes: 70 }, // ramp, then 60 °C on the panel
  { mode: 'cool', minutes: 15 },
  { mode: 'idle', minutes: 10 },
]
const BASE = 'Waterborne basecoat, silver metallic'
const CLEAR = '2K high-solids clearcoat'

class Session {
  cookie = ''
  constructor(private readonly base: string) {}

  async call<T>(method: string, path: string, body?: unknown): Promise<T> {
    const res = await fetch(this.base + path, {
      method,
      headers: { 'content-type': 'application/json', origin: this.base, ...(this.cookie && { cookie: this.cookie }) },
      ...(body !== undefined && { body: JSON.stringify(body) }),
    })
    for (const c of res.headers.getSetCookie()) this.cookie = c.split(';')[0] ?? ''
    const text = await res.text()
    if (!res.ok) throw new Error(`${method} ${path}: HTTP ${res.status} ${text.slice(0, 300)}`)
    return (text ? JSON.parse(text) : null) as T
  }
}

async function signIn(base: string, email: string, password: string): Promise<Session> {
  const s = new Session(base)
  await s.call('POST', '/api/auth/login', { email, password })
  return s
}

/** Idempotent: does nothing when the job is already there. Returns the job's number, or null when skipped. */
export async function seedFinishedJob(opts: { baseUrl: string; databaseUrl: string; password: string; log?: (line: string) => void }): Promise<string | null> {
  const log = opts.log ?? (() => undefined)
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 2 })
  try {
    if ((await pool.query('SELECT 1 FROM jobs WHERE number = $1', [HISTORY_JOB])).rowCount) return null
    const booth = (await pool.query<{ id: number }>('SELECT id FROM booths WHERE slug = $1', [BOOTH])).rows[0]
    if (!booth) throw new Error(`no booth ${BOOTH}`)
    const revisions = await pool.query<{ name: string; id: number }>(
      `SELECT DISTINCT ON (p.name) p.name, r.id FROM spec_revisions r JOIN products p ON p.id = r.product_id
       WHERE p.name = ANY($1) ORDER BY p.name, r.number DESC`,
      [[BASE, CLEAR]],
    )
    const rev = (name: string) => {
      const r = revisions.rows.find((x) => x.name === name)
      if (!r) throw new Error(`no spec revision for ${name}`)
      return r.id
    }

    // The cycle ends 5 minutes before now.
    const startMs = Math.floor((Date.now() - (planMinutes(PLAN) + 5) * 60_000) / 1000) * 1000
    const cycle = simulatePlannedCycle({ booth: BOOTH, seed: SEED, startMs, plan: PLAN })
    if (!cycle.bake) throw new Error('the history plan has no bake')
    log(`[history] ${cycle.readings.length} readings of ${BOOTH}, ${new Date(startMs).toISOString()} to ${new Date(cycle.endMs).toISOString()}`)
    await ensurePartitions(pool, startMs, cycle.endMs)
    const rows: ReadingRow[] = cycle.readings.map(({ tsMs, reading: r }) => {
      const dp = r.airTempC !== undefined && r.rhPct !== undefined && r.rhPct > 0 ? dewPointC(r.airTempC, r.rhPct) : NaN
      return {
        boothId: booth.id,
        tsMs,
        receivedMs: tsMs,
        deviceId: `larkspur-${BOOTH}`,
        seq: r.seq ?? null,
        airTempC: r.airTempC ?? null,
        rhPct: r.rhPct ?? null,
        panelTempC: r.panelTempC ?? null,
        airflowMps: r.airflowMps ?? null,
        boothDpPa: r.boothDpPa ?? null,
        intakeFilterDpPa: r.intakeFilterDpPa ?? null,
        exhaustFilterDpPa: r.exhaustFilterDpPa ?? null,
        heaterOn: r.heaterOn ?? null,
        dewPointC: Number.isFinite(dp) ? roundTo(dp, 2) : null,
      }
    })
    for (let i = 0; i < rows.length; i += 2000) await insertReadingBatch(pool, rows.slice(i, i + 2000))

    const manager = await signIn(opts.baseUrl, 'manager@larkspur.example', opts.password)
    const painter = await signIn(opts.baseUrl, 'painter@larkspur.example', opts.password)
    const tech = await signIn(opts.baseUrl, 'tech@larkspur.example', opts.password)
    const at = (ms: number) => new Date(ms).toISOString()
    const painterId = (await pool.query<{ id: number }>("SELECT id FROM users WHERE email = 'painter@larkspur.example'")).rows[0]?.id
    const job = await manager.call<{ job: { id: number } }>('POST', '/api/jobs', {
      number: HISTORY_JOB,
      vehicle: 'Small saloon, right front door (invented demo job)',
      colourCode: 'SLV-07',
      panels: ['right front door', 'right front wing (blend)'],
      ...(painterId !== undefined && { painterId }),
      boothId: booth.id,
      steps: [
        { revisionId: rev(BASE), coatsPlanned: 2 },
        { revisionId: rev(CLEAR), coatsPlanned: 2 },
      ],
    })
    const jobId = job.job.id
    const steps = (await manager.call<{ steps: { id: number }[] }>('GET', `/api/jobs/${jobId}`)).steps
    // The painter enters the coats afterwards, from the booth log: 1 and 2 basecoat, 3 and 4 clearcoat.
    for (const [i, c] of cycle.coats.entries()) {
      const step = steps[i < 2 ? 0 : 1]!
      const coat = await painter.call<{ coat: { id: number } }>('POST', '/api/coats', { jobId, stepId: step.id, coatNumber: (i % 2) + 1, at: at(c.startMs) })
      await painter.call('POST', `/api/coats/${coat.coat.id}/finish`, { at: at(c.endMs) })
    }
    // The tech records the bake and signs it off.
    const bake = await tech.call<{ bake: { id: number } }>('POST', '/api/bakes', { boothId: booth.id, startedAt: at(cycle.bake.startMs), targetC: 60 })
    await tech.call('POST', `/api/bakes/${bake.bake.id}/end`, { endedAt: at(cycle.bake.endMs) })
    await tech.call('POST', `/api/bakes/${bake.bake.id}/sign-off`, { notes: 'Panel at temperature for the full hold; cooled before handling.' })
    await manager.call('PATCH', `/api/jobs/${jobId}`, { status: 'done' })
    log(`[history] finished job ${HISTORY_JOB}: 4 coats and a signed-off bake in ${BOOTH}`)
    return HISTORY_JOB
  } finally {
    await pool.end()
  }
}
