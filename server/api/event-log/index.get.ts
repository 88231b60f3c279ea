import { z } from 'zod'
import { listEvents } from '../../repositories/event-log'

const Query = z.object({
  subjectType: z.string().max(40).optional(),
  subjectId: z.string().max(40).optional(),
  type: z.string().max(60).optional(),
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
  beforeSeq: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
})

export default defineEventHandler(async (event) => {
  await requireUser(event, ['admin', 'manager', 'auditor'])
  const q = parseQuery(event, Query)
  const rows = await listEvents(useDb(), { ...q, from: q.from ? new Date(q.from) : undefined, to: q.to ? new Date(q.to) : undefined })
  return {
    events: rows.map((r) => ({
      seq: r.seq,
      at: r.at,
      type: r.type,
      actor: r.actor_label,
      subject: { type: r.subject_type, id: r.subject_id },
      data: JSON.parse(r.payload) as unknown,
      hash: r.hash,
    })),
  }
})
