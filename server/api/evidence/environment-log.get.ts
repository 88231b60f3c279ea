import { sendEnvironmentLog } from '../../evidence/pack'
import { EVIDENCE_ROLES, ScopeQuery, toScope } from '../../evidence/scope'
import { asHttpError } from '../../utils/domain-errors'

// The raw environment log alone (CSV, RFC 4180), streamed; recorded like a pack.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, EVIDENCE_ROLES)
  const scope = toScope(parseQuery(event, ScopeQuery))
  await sendEnvironmentLog(event, useDb(), scope, user).catch(asHttpError)
})
