import type { IncomingMessage } from 'node:http'
import type { H3Event } from 'h3'
import { TDS_MAX_BYTES } from '#shared/schemas/spec'
import { settings } from '../../../config'
import { attachTds, specHttpError } from '../../../domain/specs'

// Upload of a revision's data sheet: multipart/form-data with the PDF in the field "file".
// Refused early with 413 when Content-Length (or, without one, the bytes read) goes past the limit.
const MULTIPART_ALLOWANCE = 64 * 1024 // boundaries and part headers around the file
const BODY_LIMIT = TDS_MAX_BYTES + MULTIPART_ALLOWANCE
const TOO_LARGE = `The file is larger than ${TDS_MAX_BYTES / 1024 / 1024} MB`

/** Reads the request body into memory, refusing (413) past `limit` bytes; readMultipartFormData then parses it. */
async function bufferBody(event: H3Event, limit: number): Promise<void> {
  const req = event.node.req as IncomingMessage & { rawBody?: Buffer }
  const chunks: Buffer[] = []
  let size = 0
  await new Promise<void>((resolve, reject) => {
    let over = false
    req.on('data', (chunk: Buffer) => {
      if (over) return // keep draining so the 413 reaches the client
      size += chunk.length
      if (size > limit) {
        over = true
        chunks.length = 0
        setResponseHeader(event, 'connection', 'close')
        reject(createError({ statusCode: 413, message: TOO_LARGE }))
        return
      }
      chunks.push(chunk)
    })
    req.on('end', () => resolve())
    req.on('error', reject)
  })
  req.rawBody = Buffer.concat(chunks)
}

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const declared = Number(getRequestHeader(event, 'content-length'))
  if (Number.isFinite(declared) && declared > BODY_LIMIT) {
    setResponseHeader(event, 'connection', 'close')
    throw createError({ statusCode: 413, message: TOO_LARGE })
  }
  const type = getRequestHeader(event, 'content-type') ?? ''
  if (!/^multipart\/form-data;.*boundary=/i.test(type)) {
    throw createError({ statusCode: 415, message: 'Send the data sheet as multipart/form-data, in the field "file"' })
  }
  await bufferBody(event, BODY_LIMIT)
  const parts = await readMultipartFormData(event)
  const part = parts?.find((p) => p.name === 'file' && p.filename !== undefined) ?? parts?.find((p) => p.filename !== undefined)
  if (!part) throw createError({ statusCode: 400, message: 'Choose a PDF file to upload (form field "file")' })
  const result = await attachTds(useDb(), user, id, { data: part.data, filename: part.filename }, settings().UPLOAD_DIR).catch(specHttpError)
  setResponseStatus(event, 201)
  return {
    revision: result.revision,
    file: { sha256: result.file.sha256, sizeBytes: result.file.size_bytes, name: result.file.original_name, url: `/api/files/${result.file.sha256}` },
  }
})
