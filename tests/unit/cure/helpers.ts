// Test helpers for the cure engine: series builders and fast-check arbitraries (not a test file).
import fc from 'fast-check'
import type { Sample } from '#shared/cure'

export const T0 = Date.UTC(2025, 2, 10, 8, 0, 0)
export const MIN = 60_000

/** n + 1 readings every stepMs from startMs with the same values (covers [start, start + n·step]). */
export function constantSeries(startMs: number, stepMs: number, n: number, values: Omit<Sample, 't'>): Sample[] {
  return Array.from({ length: n + 1 }, (_, i) => ({ t: startMs + i * stepMs, ...values }))
}

/** A series of readings every 30 s whose channels are drawn from the given arbitraries. */
export function seriesArb(channels: {
  airTempC?: fc.Arbitrary<number>
  rhPct?: fc.Arbitrary<number>
  airflowMps?: fc.Arbitrary<number>
  panelTempC?: fc.Arbitrary<number>
}, maxLength = 40): fc.Arbitrary<Sample[]> {
  const record = fc.record({
    airTempC: channels.airTempC ?? fc.constant(undefined),
    rhPct: channels.rhPct ?? fc.constant(undefined),
    airflowMps: channels.airflowMps ?? fc.constant(undefined),
    panelTempC: channels.panelTempC ?? fc.constant(undefined),
  })
  return fc.array(record, { minLength: 1, maxLength }).map((rows) =>
    rows.map((r, i) => {
      const s: Sample = { t: T0 + i * 30_000 }
      if (r.airTempC !== undefined) s.airTempC = r.airTempC
      if (r.rhPct !== undefined) s.rhPct = r.rhPct
      if (r.airflowMps !== undefined) s.airflowMps = r.airflowMps
      if (r.panelTempC !== undefined) s.panelTempC = r.panelTempC
      return s
    }),
  )
}

export const boothTemp = fc.double({ min: 5, max: 45, noNaN: true })
export const bakeTemp = fc.double({ min: 10, max: 90, noNaN: true })
export const rh = fc.double({ min: 5, max: 95, noNaN: true })
export const airflow = fc.double({ min: 0, max: 1.5, noNaN: true })
