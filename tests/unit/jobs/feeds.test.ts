import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { HEARTBEAT_MS, MIN_RECOMPUTE_MS, ScreenFeeds, SETTLE_MS, type BoothScreenState } from '../../../server/domain/booth-screen'

// The push: one computation per booth, shared by every screen of the booth, at most every 2 s.
function setup() {
  const computed: number[] = []
  const liveListeners = new Map<number, () => void>()
  const feeds = new ScreenFeeds(
    async (boothId) => {
      computed.push(boothId)
      return { boothId, serverTime: new Date().toISOString() } as BoothScreenState
    },
    (boothId, fn) => {
      liveListeners.set(boothId, fn)
      return () => liveListeners.delete(boothId)
    },
  )
  return { feeds, computed, reading: (boothId: number) => liveListeners.get(boothId)?.(), liveListeners }
}

describe('screen feeds', () => {
  beforeEach(() => vi.useFakeTimers())
  afterEach(() => vi.useRealTimers())

  it('recompute once per throttle window however many readings arrive, for all screens of the booth', async () => {
    const { feeds, computed, reading } = setup()
    const a: BoothScreenState[] = []
    const b: BoothScreenState[] = []
    feeds.subscribe(1, (s) => a.push(s))
    feeds.subscribe(1, (s) => b.push(s))
    await feeds.current(1)
    expect(computed).toEqual([1])
    for (let i = 0; i < 10; i++) {
      reading(1)
      await vi.advanceTimersByTimeAsync(150)
    }
    // 1.5 s of readings: one trailing recomputation, once the 2 s window is over.
    await vi.advanceTimersByTimeAsync(MIN_RECOMPUTE_MS)
    expect(computed).toEqual([1, 1])
    expect(a).toHaveLength(2)
    expect(b).toHaveLength(2)
    expect(a[1]).toBe(b[1])
  })

  it('waits for the reading to be stored before recomputing', async () => {
    const { feeds, computed, reading } = setup()
    feeds.subscribe(1, () => undefined)
    await feeds.current(1)
    await vi.advanceTimersByTimeAsync(MIN_RECOMPUTE_MS + 100)
    reading(1)
    await vi.advanceTimersByTimeAsync(SETTLE_MS - 50)
    expect(computed).toEqual([1])
    await vi.advanceTimersByTimeAsync(100)
    expect(computed).toEqual([1, 1])
  })

  it('serve a fresh state from the cache, recompute after an action or when it is old', async () => {
    const { feeds, computed } = setup()
    const first = await feeds.current(2)
    expect(await feeds.current(2)).toBe(first)
    feeds.changed(2)
    await feeds.current(2)
    expect(computed).toEqual([2, 2])
    await vi.advanceTimersByTimeAsync(MIN_RECOMPUTE_MS + 1)
    await feeds.current(2)
    expect(computed).toEqual([2, 2, 2])
  })

  it('keep one live subscription per booth, refresh on a heartbeat, and drop it with the last screen', async () => {
    const { feeds, computed, liveListeners } = setup()
    const off1 = feeds.subscribe(3, () => undefined)
    const off2 = feeds.subscribe(3, () => undefined)
    expect(liveListeners.size).toBe(1)
    await vi.advanceTimersByTimeAsync(HEARTBEAT_MS + 10)
    expect(computed).toEqual([3])
    off1()
    expect(liveListeners.size).toBe(1)
    off2()
    expect(liveListeners.size).toBe(0)
    expect(feeds.watchers(3)).toBe(0)
    await vi.advanceTimersByTimeAsync(HEARTBEAT_MS * 3)
    expect(computed).toEqual([3])
  })
})
