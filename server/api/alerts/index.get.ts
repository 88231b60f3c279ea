import { z } from 'zod'
import { listAlertViews } from '../../alerts/service'

// Alerts, newest first, with filters: booth, state (open | acknowledged | resolved | active = not resolved),
// kind, opened from / to (ISO 8601); page with ?before=<id of the last one shown>.
const Query = z
  .object({
    boothId: z.coerce.number({ error: 'boothId must be a number' }).int().positive().optional(),
    state: z.enum(['open', 'acknowledged', 'resolved', 'active'], { error: 'state is open, acknowledged, resolved or active' }).optional(),
    kind: z.string().trim().min(1).max(64).optional(),
    from: z.iso.datetime({ offset: true, error: 'from must be an ISO 8601 date-time' }).optional(),
    to: z.iso.datetime({ offset: true, error: 'to must be an ISO 8601 date-time' }).optional(),
    before: z.coerce.number().int().positive().optional(),
    limit: z.coerce.number().int().min(1).max(500).default(100),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { message: 'from must be before to', path: ['from'] })

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const q = parseQuery(event, Query)
  return listAlertViews(useDb(), {
    boothId: q.boothId,
    state: q.state,
    kind: q.kind,
    from: q.from ? new Date(q.from) : undefined,
    to: q.to ? new Date(q.to) : undefined,
    beforeId: q.before,
    limit: q.limit,
  })
})
