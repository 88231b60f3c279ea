import { z } from 'zod'
import { EVIDENCE_ROLES } from '../../evidence/scope'
import { findExport } from '../../repositories/exports'
import { exportView } from '../../evidence/exports-view'

const Id = z.uuid()

// One export with its manifest exactly as it was in the zip (its SHA-256 is manifestSha256).
export default defineEventHandler(async (event) => {
  await requireUser(event, EVIDENCE_ROLES)
  const id = Id.safeParse(getRouterParam(event, 'id'))
  if (!id.success) throw validationError([{ path: 'id', message: 'must be an export id' }], 'Invalid id')
  const row = await findExport(useDb(), id.data)
  if (!row) throw createError({ statusCode: 404, message: 'No such export' })
  return { export: exportView(row, true) }
})
