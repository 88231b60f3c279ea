import type { Kysely } from 'kysely'
import type { Database } from '../db/database'

export interface EventLogFilter {
  subjectType?: string
  subjectId?: string
  type?: string
  from?: Date
  to?: Date
  beforeSeq?: number
  limit: number
}

/** Newest first, paged by sequence number. */
export function listEvents(db: Kysely<Database>, f: EventLogFilter) {
  let q = db.selectFrom('event_log').selectAll()
  if (f.subjectType) q = q.where('subject_type', '=', f.subjectType)
  if (f.subjectId) q = q.where('subject_id', '=', f.subjectId)
  if (f.type) q = q.where('type', 'like', `${f.type.replace(/[%_]/g, '')}%`)
  if (f.from) q = q.where('at', '>=', f.from)
  if (f.to) q = q.where('at', '<', f.to)
  if (f.beforeSeq) q = q.where('seq', '<', f.beforeSeq)
  return q.orderBy('seq', 'desc').limit(f.limit).execute()
}
