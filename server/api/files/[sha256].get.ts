import { contentDisposition } from '#shared/specs/file-name'
import { settings } from '../../config'
import { openTds, specHttpError } from '../../domain/specs'
import { SHA256_HEX } from '../../repositories/files'

// An uploaded data sheet, to signed-in users only. Always a download (never rendered inline from our
// origin), with the sanitised original name.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const sha256 = (getRouterParam(event, 'sha256') ?? '').toLowerCase()
  if (!SHA256_HEX.test(sha256)) {
    throw validationError([{ path: 'sha256', message: 'must be 64 hexadecimal characters' }], 'Invalid file id')
  }
  const f = await openTds(useDb(), sha256, settings().UPLOAD_DIR).catch(specHttpError)
  setResponseHeaders(event, {
    'content-type': 'application/pdf',
    'content-length': f.size,
    'content-disposition': contentDisposition(f.file.original_name, 'attachment'),
    'x-content-type-options': 'nosniff',
    'cache-control': 'private, max-age=3600',
    etag: `"${sha256}"`,
  })
  return sendStream(event, f.stream)
})
