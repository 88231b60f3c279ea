import { describe, expect, it } from 'vitest'
import {
  ProductInputSchema,
  ProductPatchSchema,
  revisionContextIssues,
  SpecPreviewSchema,
  SpecRevisionInputSchema,
  SpecRevisionPatchSchema,
  type SpecRevisionFields,
} from '#shared/schemas/spec'
import { convertTemperatures } from '#shared/specs/units'
import { goodBody } from './fixtures'

function issuesOf(body: unknown): { path: string; message: string }[] {
  const r = SpecRevisionInputSchema.safeParse(body)
  if (r.success) return []
  return r.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }))
}
const pathsOf = (body: unknown) => issuesOf(body).map((i) => i.path)
const withField = (k: string, v: unknown) => ({ ...goodBody(), [k]: v })

describe('spec revision schema: good values', () => {
  it('accepts a complete revision and keeps SI values as sent', () => {
    const r = SpecRevisionInputSchema.safeParse(goodBody())
    expect(r.success).toBe(true)
    const f = r.data as SpecRevisionFields
    expect(f.refTempC).toBe(20)
    expect(f.reducerBands).toEqual([
      { fromC: null, toC: 18, grade: 'Fast' },
      { fromC: 18, toC: 25, grade: 'Standard' },
      { fromC: 25, toC: null, grade: 'Slow' },
    ])
    expect(f.bakeSchedules).toEqual([{ objectTempC: 60, minutes: 30 }])
    expect(f.flashTable).toBeNull()
  })

  it('fills optional fields: null for missing values, [] for lists, Q10 2', () => {
    const r = SpecRevisionInputSchema.safeParse({ refTempC: 21, flashMinMinutes: 3, flashMaxMinutes: 6, flashBeforeNextMinutes: 10, coats: 1 })
    expect(r.success).toBe(true)
    expect(r.data).toMatchObject({ q10: 2, reducerBands: [], bakeSchedules: [], potLifeMinutes: null, mixRatio: null, flashTable: null, wbRefRhPct: null })
  })

  it('normalises the mix ratio and treats an empty one as none', () => {
    expect((SpecRevisionInputSchema.parse(withField('mixRatio', ' 4 : 1 : 1 ')) as SpecRevisionFields).mixRatio).toBe('4:1:1')
    expect((SpecRevisionInputSchema.parse(withField('mixRatio', '')) as SpecRevisionFields).mixRatio).toBeNull()
  })
})

describe('spec revision schema: each out-of-range field gives a message at its path', () => {
  const cases: [string, unknown, RegExp][] = [
    ['refTempC', 80, /reference temperature must be between 5 and 40 °C/i],
    ['flashMinMinutes', 0, /shortest flash between coats must be between/i],
    ['flashMaxMinutes', 500, /longest flash between coats must be between/i],
    ['flashBeforeNextMinutes', -1, /flash before the next product/i],
    ['recoatWindowMinutes', 20_000, /recoat window must be between/i],
    ['coats', 7, /number of coats must be between 1 and 6/i],
    ['coats', 2.5, /whole number/i],
    ['potLifeMinutes', 2, /pot life must be between 5 and 1440 min/i],
    ['mixRatio', 'four to one', /parts by volume/i],
    ['minAirTempC', -30, /lowest application temperature/i],
    ['maxRhPct', 120, /highest application humidity must be between 0 and 100 %/i],
    ['dustFreeMinutes', 0, /dust-free time/i],
    ['minCureTempC', 90, /minimum cure temperature must be between/i],
    ['q10', 0.5, /Q10 must be between 1 and 5/],
    ['wbRefAirflowMps', 9, /reference air velocity/i],
    ['wbAirflowExponent', 1.5, /airflow exponent must be between 0 and 1/i],
  ]
  it.each(cases)('%s = %s', (field, value, message) => {
    const issues = issuesOf(withField(field, value))
    expect(issues).toHaveLength(1)
    expect(issues[0]!.path).toBe(field)
    expect(issues[0]!.message).toMatch(message)
  })

  it('names a missing required field', () => {
    const body = goodBody()
    delete body.refTempC
    expect(issuesOf(body)).toEqual([{ path: 'refTempC', message: 'Enter the reference temperature' }])
    expect(issuesOf(withField('coats', 'two'))).toEqual([{ path: 'coats', message: 'The number of coats must be a number' }])
  })

  it('points into lists: a bad bake temperature, a bad table row', () => {
    expect(pathsOf(withField('bakeSchedules', [{ objectTempC: 60, minutes: 30 }, { objectTempC: 300, minutes: 10 }]))).toEqual(['bakeSchedules.1.objectTempC'])
    expect(pathsOf(withField('flashTable', [{ tempC: 10, minutes: 12 }, { tempC: 20, minutes: 0 }]))).toEqual(['flashTable.1.minutes'])
    expect(pathsOf(withField('reducerBands', [{ fromC: 10, toC: 20, grade: '' }]))).toEqual(['reducerBands.0.grade'])
  })
})

describe('spec revision schema: rules between fields', () => {
  it('refuses overlapping reducer bands, at the later band', () => {
    const issues = issuesOf(
      withField('reducerBands', [
        { fromC: null, toC: 20, grade: 'Fast' },
        { fromC: 18, toC: 27, grade: 'Standard' },
      ]),
    )
    expect(issues).toEqual([{ path: 'reducerBands.1.fromC', message: expect.stringMatching(/overlaps band 1/) }])
  })

  it('refuses overlap whatever the order the bands come in, and two open-ended bands', () => {
    expect(pathsOf(withField('reducerBands', [{ fromC: 25, toC: null, grade: 'Slow' }, { fromC: 15, toC: 26, grade: 'Std' }]))).toEqual(['reducerBands.0.fromC'])
    expect(pathsOf(withField('reducerBands', [{ fromC: null, toC: 20, grade: 'A' }, { fromC: null, toC: 30, grade: 'B' }]))).toContain('reducerBands.1.fromC')
  })

  it('accepts bands that only touch (half-open [from, to))', () => {
    expect(issuesOf(withField('reducerBands', [{ fromC: 10, toC: 20, grade: 'A' }, { fromC: 20, toC: 30, grade: 'B' }]))).toEqual([])
  })

  it('refuses a band whose upper edge is not above the lower', () => {
    expect(pathsOf(withField('reducerBands', [{ fromC: 25, toC: 18, grade: 'Odd' }]))).toEqual(['reducerBands.0.toC'])
  })

  it('refuses a flash max below the min, and a recoat window shorter than the flash', () => {
    expect(pathsOf({ ...goodBody(), flashMinMinutes: 10, flashMaxMinutes: 5 })).toEqual(['flashMaxMinutes'])
    expect(pathsOf({ ...goodBody(), recoatWindowMinutes: 8 })).toEqual(['recoatWindowMinutes'])
  })

  it('refuses min above max in the application limits', () => {
    expect(pathsOf({ ...goodBody(), minAirTempC: 30, maxAirTempC: 20 })).toEqual(['maxAirTempC'])
    expect(pathsOf({ ...goodBody(), minRhPct: 70, maxRhPct: 40 })).toEqual(['maxRhPct'])
  })

  it('refuses a hotter bake that takes longer, and air-dry times out of order', () => {
    expect(
      pathsOf(
        withField('bakeSchedules', [
          { objectTempC: 60, minutes: 30 },
          { objectTempC: 80, minutes: 45 },
        ]),
      ),
    ).toEqual(['bakeSchedules.1.minutes'])
    expect(pathsOf({ ...goodBody(), handleMinutes: 10 })).toEqual(['handleMinutes'])
    // 10 min to polish at 20 °C but 30 min at 60 °C: the air-dry point does not fit the bake.
    expect(pathsOf({ ...goodBody(), dustFreeMinutes: null, handleMinutes: null, sandPolishMinutes: 10 })).toEqual(['sandPolishMinutes'])
  })

  it('asks for the minimum cure temperature with bake schedules', () => {
    expect(pathsOf({ ...goodBody(), minCureTempC: null })).toEqual(['minCureTempC'])
  })

  it('refuses a flash table that gets slower when warmer or repeats a temperature', () => {
    expect(pathsOf(withField('flashTable', [{ tempC: 10, minutes: 8 }, { tempC: 20, minutes: 12 }]))).toEqual(['flashTable.1.minutes'])
    expect(pathsOf(withField('flashTable', [{ tempC: 10, minutes: 8 }, { tempC: 10, minutes: 6 }]))).toEqual(['flashTable.1.tempC'])
  })
})

describe('°F entry', () => {
  it('converts every temperature to °C and leaves the rest alone', () => {
    const body = {
      ...goodBody(),
      unit: 'F',
      refTempC: 68,
      minAirTempC: 59,
      maxAirTempC: 95,
      minCureTempC: 50,
      reducerBands: [
        { fromC: null, toC: 64.4, grade: 'Fast' },
        { fromC: 64.4, toC: 77, grade: 'Standard' },
        { fromC: 77, toC: null, grade: 'Slow' },
      ],
      bakeSchedules: [{ objectTempC: 140, minutes: 30 }],
      flashTable: [
        { tempC: 50, minutes: 15 },
        { tempC: 86, minutes: 5 },
      ],
    }
    const f = SpecRevisionInputSchema.parse(body) as SpecRevisionFields
    expect(f.refTempC).toBeCloseTo(20, 10)
    expect(f.minAirTempC).toBeCloseTo(15, 10)
    expect(f.maxAirTempC).toBeCloseTo(35, 10)
    expect(f.minCureTempC).toBeCloseTo(10, 10)
    expect(f.reducerBands[1]!.fromC).toBeCloseTo(18, 10)
    expect(f.reducerBands[2]!.fromC).toBeCloseTo(25, 10)
    expect(f.reducerBands[0]!.fromC).toBeNull()
    expect(f.bakeSchedules[0]).toEqual({ objectTempC: expect.closeTo(60, 10), minutes: 30 })
    expect(f.flashTable![1]!.tempC).toBeCloseTo(30, 10)
    // Minutes, humidity and Q10 are not temperatures.
    expect(f.flashMinMinutes).toBe(5)
    expect(f.maxRhPct).toBe(80)
    expect(f.q10).toBe(2)
    expect(f).not.toHaveProperty('unit')
  })

  it('checks temperatures in °F with messages in °F', () => {
    const issues = issuesOf({ ...goodBody(), unit: 'F', refTempC: 20, minAirTempC: 59, maxAirTempC: 95, minCureTempC: 50, reducerBands: [], bakeSchedules: [] })
    expect(issues).toEqual([{ path: 'refTempC', message: 'The reference temperature must be between 41 and 104 °F' }])
  })

  it('refuses an unknown unit', () => {
    expect(issuesOf({ ...goodBody(), unit: 'K' })).toEqual([{ path: 'unit', message: expect.stringMatching(/'C' or 'F'/) }])
  })

  it('round-trips through the form conversion helper', () => {
    const si = SpecRevisionInputSchema.parse(goodBody()) as SpecRevisionFields
    const inF = convertTemperatures(si, 'C', 'F')
    expect(inF.refTempC).toBeCloseTo(68, 10)
    expect(inF.bakeSchedules[0]!.objectTempC).toBeCloseTo(140, 10)
    const back = SpecRevisionInputSchema.parse({ ...inF, unit: 'F' }) as SpecRevisionFields
    expect(back.refTempC).toBeCloseTo(si.refTempC, 10)
    expect(back.reducerBands[1]!.toC).toBeCloseTo(25, 10)
  })
})

describe('patch schema', () => {
  it('keeps only the fields sent, converts °F, and null clears', () => {
    const r = SpecRevisionPatchSchema.parse({ unit: 'F', refTempC: 77, potLifeMinutes: null })
    expect(r).toEqual({ refTempC: expect.closeTo(25, 10), potLifeMinutes: null })
  })
  it('refuses an empty patch and checks each field sent', () => {
    expect(SpecRevisionPatchSchema.safeParse({}).success).toBe(false)
    const bad = SpecRevisionPatchSchema.safeParse({ coats: 9 })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues[0]!.path).toEqual(['coats'])
  })
})

describe('product context', () => {
  it('asks a 2K revision for pot life and mix ratio', () => {
    const f = SpecRevisionInputSchema.parse({ ...goodBody(), potLifeMinutes: null, mixRatio: null }) as SpecRevisionFields
    expect(revisionContextIssues({ chemistry: 'solvent', components: 2 }, f).map((i) => i.path)).toEqual(['potLifeMinutes', 'mixRatio'])
    expect(revisionContextIssues({ chemistry: 'solvent', components: 1 }, f)).toEqual([])
  })
  it('keeps flash tables to solvent-borne and waterborne references to waterborne products', () => {
    const f = SpecRevisionInputSchema.parse({ ...goodBody(), flashTable: [{ tempC: 10, minutes: 12 }, { tempC: 30, minutes: 4 }], wbRefRhPct: 50 }) as SpecRevisionFields
    expect(revisionContextIssues({ chemistry: 'waterborne', components: 2 }, f).map((i) => i.path)).toEqual(['flashTable'])
    expect(revisionContextIssues({ chemistry: 'solvent', components: 2 }, f).map((i) => i.path)).toEqual(['wbRefRhPct'])
  })
})

describe('product and preview schemas', () => {
  it('validates a product', () => {
    expect(ProductInputSchema.parse({ name: '  Test primer ', category: 'primer_surfacer', chemistry: 'solvent', components: 2 })).toEqual({
      name: 'Test primer',
      category: 'primer_surfacer',
      chemistry: 'solvent',
      components: 2,
      notes: '',
    })
    const bad = ProductInputSchema.safeParse({ name: '', category: 'paint', chemistry: 'oil', components: 3 })
    expect(bad.error!.issues.map((i) => i.path.join('.')).sort()).toEqual(['category', 'chemistry', 'components', 'name'])
    expect(ProductPatchSchema.safeParse({}).success).toBe(false)
  })

  it('needs a revision id or product + fields for a preview', () => {
    expect(SpecPreviewSchema.safeParse({ airTempC: 20, rhPct: 50 }).success).toBe(false)
    expect(SpecPreviewSchema.safeParse({ revisionId: 3, airTempC: 20, rhPct: 50 }).success).toBe(true)
    const nested = SpecPreviewSchema.safeParse({ product: { chemistry: 'solvent', components: 2 }, revision: { ...goodBody(), coats: 0 }, airTempC: 20, rhPct: 50 })
    expect(nested.error!.issues.map((i) => i.path.join('.'))).toEqual(['revision.coats'])
  })
})
