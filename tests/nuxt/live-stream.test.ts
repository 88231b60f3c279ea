import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { effectScope } from 'vue'
import { useLiveStream } from '~/composables/useLiveStream'
import { FakeEventSource } from './fake-event-source'

describe('useLiveStream', () => {
  beforeEach(() => {
    FakeEventSource.reset()
    vi.stubGlobal('EventSource', FakeEventSource)
    vi.useFakeTimers()
  })
  afterEach(() => {
    vi.useRealTimers()
    vi.unstubAllGlobals()
  })

  it('parses events, reconnects with a growing delay, and closes with its scope', async () => {
    const got: unknown[] = []
    const scope = effectScope()
    const s = scope.run(() => useLiveStream('/api/live', { booth: (d) => got.push(d) }))!

    expect(FakeEventSource.instances).toHaveLength(1)
    expect(FakeEventSource.last().url).toBe('/api/live')
    expect(s.state.value).toBe('connecting')
    FakeEventSource.last().open()
    expect(s.state.value).toBe('open')

    FakeEventSource.last().emit('booth', { boothId: 1 })
    FakeEventSource.last().emit('booth', 'not json')
    expect(got).toEqual([{ boothId: 1 }])

    // First failure: about 1 s (±20 %).
    const first = FakeEventSource.last()
    first.fail()
    expect(first.readyState).toBe(2)
    expect(s.state.value).toBe('reconnecting')
    vi.advanceTimersByTime(790)
    expect(FakeEventSource.instances).toHaveLength(1)
    vi.advanceTimersByTime(420)
    expect(FakeEventSource.instances).toHaveLength(2)

    // Second failure in a row: about 2 s.
    FakeEventSource.last().fail()
    expect(s.failures.value).toBe(2)
    vi.advanceTimersByTime(1_500)
    expect(FakeEventSource.instances).toHaveLength(2)
    vi.advanceTimersByTime(1_000)
    expect(FakeEventSource.instances).toHaveLength(3)

    // Success resets the count.
    FakeEventSource.last().open()
    expect(s.failures.value).toBe(0)
    expect(s.state.value).toBe('open')

    scope.stop()
    expect(FakeEventSource.last().readyState).toBe(2)
    expect(s.state.value).toBe('closed')
    vi.advanceTimersByTime(60_000)
    expect(FakeEventSource.instances).toHaveLength(3)
  })

  it('reconnects when the stream goes silent', () => {
    const scope = effectScope()
    const s = scope.run(() => useLiveStream('/api/live', {}, { silenceMs: 20_000 }))!
    FakeEventSource.last().open()
    vi.advanceTimersByTime(26_000)
    expect(s.state.value).toBe('reconnecting')
    vi.advanceTimersByTime(1_300)
    expect(FakeEventSource.instances).toHaveLength(2)
    scope.stop()
  })

  it('waits for open() when not immediate, and does nothing without a URL', () => {
    const scope = effectScope()
    const s = scope.run(() => useLiveStream('/api/live', {}, { immediate: false }))!
    expect(FakeEventSource.instances).toHaveLength(0)
    s.open()
    expect(FakeEventSource.instances).toHaveLength(1)
    const none = scope.run(() => useLiveStream(null, {}))!
    expect(none.state.value).toBe('idle')
    expect(FakeEventSource.instances).toHaveLength(1)
    scope.stop()
  })
})
