import { onBeforeUnmount, onMounted, ref } from 'vue'

/** A ticking "now" (ms) for "x s ago" texts; ticks only in the browser while the component is mounted. */
export function useClock(intervalMs = 1_000) {
  // Starts from the server's render time so the hydrated text matches the server's; the first
  // tick after mounting moves it to the real time.
  const rendered = useState('bb-render-now', () => Date.now())
  const now = ref(import.meta.client && !useNuxtApp().isHydrating ? Date.now() : rendered.value)
  let timer: ReturnType<typeof setInterval> | null = null
  onMounted(() => {
    now.value = Date.now()
    timer = setInterval(() => (now.value = Date.now()), intervalMs)
  })
  onBeforeUnmount(() => {
    if (timer) clearInterval(timer)
  })
  return now
}

/** "12 min", "1 h 5 min", "40 s" for a span in ms. */
export function spanText(ms: number): string {
  const s = Math.max(0, Math.round(ms / 1000))
  if (s < 60) return `${s} s`
  const m = Math.floor(s / 60)
  if (m < 60) return `${m} min`
  const h = Math.floor(m / 60)
  if (h < 48) return m % 60 ? `${h} h ${m % 60} min` : `${h} h`
  return `${Math.floor(h / 24)} d`
}
