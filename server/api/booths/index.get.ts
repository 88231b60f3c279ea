import { listBoothsWithLatest } from '../../domain/booths'

// Public contract (DESIGN.md §11): booths with topic, device id and latest reading.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return { booths: await listBoothsWithLatest(useDb()) }
})
