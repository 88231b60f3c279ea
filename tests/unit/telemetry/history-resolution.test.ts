import { describe, expect, it } from 'vitest'
import { chooseResolution, MAX_POINTS } from '../../../server/domain/history'

describe('chooseResolution', () => {
  it('reads raw rows while 1 Hz readings fit the point budget', () => {
    expect(chooseResolution(MAX_POINTS * 1000)).toEqual({ resolution: 'raw', bucketSec: 1 })
  })
  it('buckets raw rows for ranges of a few hours', () => {
    expect(chooseResolution(4 * 3600_000)).toEqual({ resolution: 'raw-buckets', bucketSec: 5 })
  })
  it('uses whole-minute rollups for a day or more and never exceeds the budget', () => {
    for (const days of [1, 2, 7, 30, 400]) {
      const range = days * 86_400_000
      const r = chooseResolution(range)
      expect(r.resolution).toBe('minute-buckets')
      expect(r.bucketSec % 60).toBe(0)
      expect(range / 1000 / r.bucketSec).toBeLessThanOrEqual(MAX_POINTS)
    }
  })
})
