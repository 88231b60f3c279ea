import { BakeListQuery } from '#shared/bake/schemas'
import { listBakeViews } from '../../domain/bakes'

// Bakes, newest first. ?state=to_confirm lists the detected bakes a tech should confirm; ?state=running the open ones.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const q = parseQuery(event, BakeListQuery)
  const state = q.state === 'to_confirm' || q.state === 'running' ? undefined : q.state
  const bakes = await listBakeViews(useDb(), {
    boothId: q.boothId,
    state,
    toConfirm: q.state === 'to_confirm',
    running: q.state === 'running',
    limit: q.limit,
  })
  return { bakes }
})
