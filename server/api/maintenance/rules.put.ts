import { RuleBody } from '#shared/bake/schemas'
import { setRule } from '../../domain/maintenance'

// A manager changes one reminder rule of a booth.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, MANAGERS)
  const body = await parseBody(event, RuleBody)
  try {
    return { rule: await setRule(useDb(), user, body) }
  } catch (e) {
    asHttpError(e)
  }
})
