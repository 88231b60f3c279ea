import type { IncomingMessage } from 'node:http'
import { TDS_MAX_BYTES } from '#shared/schemas/spec'
import { multipartBoundary, parseMultipart } from '#shared/specs/multipart'
import { settings } from '../../../config'
import { attachTds, specHttpError } from '../../../domain/specs'

// Upload of a revision's data sheet: multipart/form-data with the PDF in the field "file" (read with our
// own parser, shared/specs/multipart.ts: UTF-8 names, native boundary search).
// Refused early with 413 when Content-Length (or, without one, the bytes read) goes past the limit.
const MULTIPART_ALLOWANCE = 64 * 1024 // boundaries and part headers around the file
const BODY_LIMIT = TDS_MAX_BYTES + MULTIPART_ALLOWANCE
const TOO_LARGE = `The file is larger than ${TDS_MAX_BYTES / 1024 / 1024} MB`

// Past the limit the rest of the body is still read and dropped (up to DRAIN_CAP), so the client gets to
// read the 413 instead of a broken pipe; a body beyond that has its connection cut.
const DRAIN_CAP = 4 * BODY_LIMIT

function drainRest(req: IncomingMessage, alreadyRead: number): void {
  let n = alreadyRead
  req.on('data', (chunk: Buffer) => {
    n += chunk.length
    if (n > DRAIN_CAP) req.socket.destroy()
  })
  req.resume()
}

/** Reads the request body into memory, refusing (413) past `limit` bytes. */
async function bufferBody(req: IncomingMessage, limit: number): Promise<Buffer> {
  const chunks: Buffer[] = []
  let size = 0
  await new Promise<void>((resolve, reject) => {
    const onData = (chunk: Buffer) => {
      size += chunk.length
      if (size <= limit) {
        chunks.push(chunk)
        return
      }
      req.off('data', onData)
      chunks.length = 0
      drainRest(req, size)
      reject(createError({ statusCode: 413, message: TOO_LARGE }))
    }
    req.on('data', onData)
    req.on('end', () => resolve())
    req.on('error', reject)
  })
  return Buffer.concat(chunks)
}

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const declared = Number(getRequestHeader(event, 'content-length'))
  if (Number.isFinite(declared) && declared > BODY_LIMIT) {
    if (declared > DRAIN_CAP) setResponseHeader(event, 'connection', 'close')
    else drainRest(event.node.req, 0)
    throw createError({ statusCode: 413, message: TOO_LARGE })
  }
  const boundary = multipartBoundary(getRequestHeader(event, 'content-type'))
  if (!boundary) throw createError({ statusCode: 415, message: 'Send the data sheet as multipart/form-data, in the field "file"' })
  const parts = parseMultipart(await bufferBody(event.node.req, BODY_LIMIT), boundary)
  const part = parts.find((p) => p.name === 'file' && p.filename !== undefined) ?? parts.find((p) => p.filename !== undefined)
  if (!part) throw createError({ statusCode: 400, message: 'Choose a PDF file to upload (form field "file")' })
  const result = await attachTds(useDb(), user, id, { data: part.data, filename: part.filename }, settings().UPLOAD_DIR).catch(specHttpError)
  setResponseStatus(event, 201)
  return {
    revision: result.revision,
    file: { sha256: result.file.sha256, sizeBytes: result.file.size_bytes, name: result.file.original_name, url: `/api/files/${result.file.sha256}` },
  }
})
