import { screenFeeds, type BoothScreenState } from '../../../../domain/booth-screen'
import { findBooth } from '../../../../repositories/booths'

// Server-Sent Events of the booth screen's state: the state at once, then a new one on every live
// reading (recomputed at most every 2 s per booth, shared by all screens of the booth), after each
// coat or mix action, and at least every 10 s; a heartbeat every 10 s.
export default defineEventHandler(async (event) => {
  const id = idParam(event)
  await requireBoothViewer(event, id)
  if (!(await findBooth(useDb(), id))) throw createError({ statusCode: 404, message: 'No such booth' })
  const feeds = screenFeeds(useDb())
  const stream = createEventStream(event)
  let last: string | null = null
  const send = (s: BoothScreenState) => {
    const data = JSON.stringify(s)
    if (data === last) return
    last = data
    void stream.push({ event: 'screen', data })
  }
  const unsubscribe = feeds.subscribe(id, send)
  const heartbeat = setInterval(() => void stream.push({ event: 'heartbeat', data: JSON.stringify({ serverTime: new Date().toISOString() }) }), 10_000)
  stream.onClosed(async () => {
    clearInterval(heartbeat)
    unsubscribe()
    await stream.close()
  })
  setTimeout(() => {
    feeds.current(id).then(send, (e: unknown) => console.warn(`[screen] booth ${id}:`, e instanceof Error ? e.message : e))
  }, 0)
  return stream.send()
})
