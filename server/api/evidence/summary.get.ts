import { randomUUID } from 'node:crypto'
import { buildReport, reportSummary, resolveScope } from '../../evidence/report'
import { EVIDENCE_ROLES, ScopeQuery, toScope } from '../../evidence/scope'
import { asHttpError } from '../../utils/domain-errors'

// What a pack would state (coats and verdicts, bakes, alerts, revisions, calibrations, chain), without
// making one: the evidence page's preview. Not recorded (nothing leaves but what the page shows).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, EVIDENCE_ROLES)
  const scope = toScope(parseQuery(event, ScopeQuery))
  const db = useDb()
  try {
    const now = Date.now()
    const resolved = await resolveScope(db, scope, now)
    return reportSummary(await buildReport(db, resolved, user, `preview-${randomUUID()}`, now))
  } catch (e) {
    asHttpError(e)
  }
})
