import { verifyChain } from '../../domain/event-log'

// Walks the whole chain: intact, or the first row whose link or hash does not match.
export default defineEventHandler(async (event) => {
  await requireUser(event, ['admin', 'manager', 'auditor'])
  return verifyChain(useDb())
})
