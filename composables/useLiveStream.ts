import { getCurrentScope, onScopeDispose, readonly, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'

export type LiveConnectionState = 'idle' | 'connecting' | 'open' | 'reconnecting' | 'closed'

export interface LiveStreamOptions {
  /** Open at once (default true). Otherwise call `open()`. */
  immediate?: boolean
  /** First reconnect delay, doubled on each failure up to `maxDelayMs` (with ±20 % jitter). */
  minDelayMs?: number
  maxDelayMs?: number
  /** No event (a heartbeat comes every 10 s) for this long → reconnect. 0 turns the watchdog off. */
  silenceMs?: number
  onOpen?: () => void
  /** Called after each failure with the number of failures in a row. */
  onError?: (failures: number) => void
}

type Handler = (data: unknown, event: MessageEvent<string>) => void

/**
 * EventSource with our own reconnect (exponential backoff with jitter, a silence watchdog, a retry
 * when the browser comes back online). Client-only: on the server it stays 'idle'. Closed when the
 * calling component (or effect scope) goes away.
 *
 *   const { state, open, close } = useLiveStream('/api/live', {
 *     booth: (data) => store.applyLive(data as LiveBoothEvent),
 *     heartbeat: (data) => store.applyHeartbeat(data as LiveHeartbeat),
 *   })
 *
 * Event data is JSON-parsed before it reaches a handler; an event that does not parse is skipped.
 * A reactive `url` reopens the stream when it changes (null closes it).
 */
export function useLiveStream(url: MaybeRefOrGetter<string | null>, handlers: Record<string, Handler>, options: LiveStreamOptions = {}) {
  const minDelay = options.minDelayMs ?? 1_000
  const maxDelay = options.maxDelayMs ?? 30_000
  const silenceMs = options.silenceMs ?? 35_000

  const state = ref<LiveConnectionState>('idle')
  const failures = ref(0)
  const lastEventAt = ref<number | null>(null)
  const nextRetryAt = ref<number | null>(null)

  let source: EventSource | null = null
  let retryTimer: ReturnType<typeof setTimeout> | null = null
  let watchdog: ReturnType<typeof setInterval> | null = null
  let wanted = false
  const supported = import.meta.client && typeof EventSource !== 'undefined'

  function clearTimers() {
    if (retryTimer) clearTimeout(retryTimer)
    retryTimer = null
    if (watchdog) clearInterval(watchdog)
    watchdog = null
  }

  function detach() {
    if (source) {
      source.onopen = null
      source.onerror = null
      source.close()
      source = null
    }
  }

  function touch() {
    lastEventAt.value = Date.now()
  }

  function connect() {
    detach()
    const target = toValue(url)
    if (!supported || !target) {
      state.value = 'idle'
      return
    }
    state.value = failures.value > 0 ? 'reconnecting' : 'connecting'
    const es = new EventSource(target, { withCredentials: true })
    source = es
    es.onopen = () => {
      failures.value = 0
      nextRetryAt.value = null
      state.value = 'open'
      touch()
      options.onOpen?.()
    }
    es.onerror = () => {
      // The browser would retry on its own for network errors but gives up on HTTP errors;
      // we always take over so the backoff is ours.
      if (source === es) scheduleRetry()
    }
    for (const [name, handler] of Object.entries(handlers)) {
      es.addEventListener(name, (ev) => {
        touch()
        const me = ev as MessageEvent<string>
        let data: unknown
        try {
          data = JSON.parse(me.data)
        } catch {
          return
        }
        handler(data, me)
      })
    }
    if (silenceMs > 0 && !watchdog) {
      watchdog = setInterval(() => {
        if (state.value === 'open' && lastEventAt.value !== null && Date.now() - lastEventAt.value > silenceMs) scheduleRetry()
      }, Math.min(silenceMs, 5_000))
    }
  }

  function scheduleRetry() {
    detach()
    if (!wanted) return
    failures.value += 1
    options.onError?.(failures.value)
    if (!wanted) return
    const base = Math.min(maxDelay, minDelay * 2 ** (failures.value - 1))
    const delay = Math.round(base * (0.8 + Math.random() * 0.4))
    state.value = 'reconnecting'
    nextRetryAt.value = Date.now() + delay
    if (retryTimer) clearTimeout(retryTimer)
    retryTimer = setTimeout(() => {
      retryTimer = null
      if (wanted) connect()
    }, delay)
  }

  function onOnline() {
    if (wanted && state.value !== 'open') {
      if (retryTimer) clearTimeout(retryTimer)
      retryTimer = null
      connect()
    }
  }

  function open() {
    if (!supported) return
    wanted = true
    if (!source) {
      window.addEventListener('online', onOnline)
      connect()
    }
  }

  function close() {
    wanted = false
    clearTimers()
    detach()
    nextRetryAt.value = null
    if (supported) window.removeEventListener('online', onOnline)
    state.value = state.value === 'idle' ? 'idle' : 'closed'
  }

  /** Drops the current connection and connects again now (e.g. after signing in again). */
  function reconnect() {
    if (!wanted) return open()
    failures.value = 0
    if (retryTimer) clearTimeout(retryTimer)
    retryTimer = null
    connect()
  }

  watch(
    () => toValue(url),
    () => {
      if (wanted) reconnect()
    },
  )

  if (getCurrentScope()) onScopeDispose(close)
  if (options.immediate !== false) open()

  return {
    state: readonly(state),
    failures: readonly(failures),
    lastEventAt: readonly(lastEventAt),
    nextRetryAt: readonly(nextRetryAt),
    supported,
    open,
    close,
    reconnect,
  }
}
