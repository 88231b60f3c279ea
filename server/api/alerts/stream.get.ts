import { createEventStream } from 'h3'
import { onAlertChange } from '../../alerts/bus'
import { alertSummary } from '../../alerts/service'

// Server-Sent Events: `alert` for each change (opened, cleared, acknowledged, resolved, updated) with the alert,
// `summary` with the active counts per booth (at once, then after changes, at most every 500 ms), and a
// `heartbeat` every 10 s.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const db = useDb()
  const stream = createEventStream(event)
  let closed = false
  let summaryTimer: NodeJS.Timeout | null = null
  const sendSummary = () => {
    summaryTimer = null
    alertSummary(db)
      .then((s) => {
        if (!closed) void stream.push({ event: 'summary', data: JSON.stringify(s) })
      })
      .catch(() => undefined)
  }
  const unsubscribe = onAlertChange((c) => {
    if (closed) return
    void stream.push({ event: 'alert', data: JSON.stringify(c) })
    summaryTimer ??= setTimeout(sendSummary, 500)
  })
  const heartbeat = setInterval(() => {
    void stream.push({ event: 'heartbeat', data: JSON.stringify({ serverTime: new Date().toISOString() }) })
  }, 10_000)
  stream.onClosed(async () => {
    closed = true
    clearInterval(heartbeat)
    if (summaryTimer) clearTimeout(summaryTimer)
    unsubscribe()
    await stream.close()
  })
  setTimeout(sendSummary, 0)
  return stream.send()
})
