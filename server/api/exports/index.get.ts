import { z } from 'zod'
import { EVIDENCE_ROLES } from '../../evidence/scope'
import { listExports } from '../../repositories/exports'
import { exportView } from '../../evidence/exports-view'

const Query = z.object({
  jobId: z.coerce.number().int().positive().optional(),
  before: z.iso.datetime({ offset: true }).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
})

// Who exported what and when, newest first.
export default defineEventHandler(async (event) => {
  await requireUser(event, EVIDENCE_ROLES)
  const q = parseQuery(event, Query)
  const rows = await listExports(useDb(), { limit: q.limit, jobId: q.jobId, before: q.before ? new Date(q.before) : undefined })
  return { exports: rows.map((r) => exportView(r, false)) }
})
