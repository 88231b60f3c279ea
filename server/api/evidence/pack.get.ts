import { sendEvidencePack } from '../../evidence/pack'
import { EVIDENCE_ROLES, ScopeQuery, toScope } from '../../evidence/scope'
import { asHttpError } from '../../utils/domain-errors'

// The evidence pack (zip: report.pdf, environment-log.csv, manifest.json), streamed. A read: the auditor
// may export; the export is recorded in the event log and the exports table.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, EVIDENCE_ROLES)
  const scope = toScope(parseQuery(event, ScopeQuery))
  await sendEvidencePack(event, useDb(), scope, user).catch(asHttpError)
})
