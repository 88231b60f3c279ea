import { z } from 'zod'
import type { EvidenceScope } from './types'

// What an evidence request covers, from its query: `?jobId=12`, or `?boothId=1&from=…&to=…` (ISO 8601).

export const ScopeQuery = z
  .object({
    jobId: z.coerce.number().int().positive().optional(),
    boothId: z.coerce.number().int().positive().optional(),
    from: z.iso.datetime({ offset: true }).optional(),
    to: z.iso.datetime({ offset: true }).optional(),
  })
  .superRefine((q, ctx) => {
    if (q.jobId !== undefined) {
      if (q.boothId !== undefined) ctx.addIssue({ code: 'custom', path: ['boothId'], message: 'Give a job or a booth, not both' })
      return
    }
    if (q.boothId === undefined) {
      ctx.addIssue({ code: 'custom', path: ['jobId'], message: 'Choose a job, or a booth and a period' })
      return
    }
    if (!q.from) ctx.addIssue({ code: 'custom', path: ['from'], message: 'Give the start of the period' })
    if (!q.to) ctx.addIssue({ code: 'custom', path: ['to'], message: 'Give the end of the period' })
    if (q.from && q.to && Date.parse(q.to) <= Date.parse(q.from)) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The end must be after the start' })
  })

export function toScope(q: z.output<typeof ScopeQuery>): EvidenceScope {
  if (q.jobId !== undefined) return { kind: 'job', jobId: q.jobId }
  return { kind: 'booth', boothId: q.boothId!, from: new Date(q.from!), to: new Date(q.to!) }
}

/** Who may make evidence packs and see the exports record (DESIGN.md §1: auditor; managers and admins too). */
export const EVIDENCE_ROLES = ['admin', 'manager', 'auditor'] as const
