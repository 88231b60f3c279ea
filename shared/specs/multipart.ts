// A small multipart/form-data reader (RFC 7578) for file uploads. h3's own reader walks the body a byte
// at a time in JavaScript and decodes part headers as Latin-1, which garbles UTF-8 file names and is slow
// for a 20 MB data sheet; this one finds boundaries with the native indexOf and decodes headers as UTF-8.
// Pure: works on Uint8Array, no Node or browser APIs beyond TextDecoder.

export interface MultipartPart {
  /** The form field name. */
  name: string
  /** The file name the client gave (undefined for a plain field). */
  filename?: string
  contentType?: string
  /** The part's bytes (a view into the body, not a copy). */
  data: Uint8Array
}

/** The boundary of a multipart/form-data Content-Type, or null. */
export function multipartBoundary(contentType: string | null | undefined): string | null {
  if (!contentType || !/^multipart\/form-data\s*;/i.test(contentType)) return null
  const m = /;\s*boundary=(?:"([^"]{1,70})"|([^\s;]{1,70}))/i.exec(contentType)
  return m ? (m[1] ?? m[2] ?? null) : null
}

function indexOfBytes(hay: Uint8Array, needle: Uint8Array, from: number): number {
  const first = needle[0]!
  const last = hay.length - needle.length
  let i = from
  while (i <= last) {
    i = hay.indexOf(first, i)
    if (i < 0 || i > last) return -1
    let k = 1
    while (k < needle.length && hay[i + k] === needle[k]) k++
    if (k === needle.length) return i
    i++
  }
  return -1
}

const utf8 = new TextDecoder('utf-8', { fatal: false })
const ascii = (s: string) => new TextEncoder().encode(s)

/**
 * Reads a parameter of a header value: quoted or a token. Browsers write `"`, CR and LF in names as %22,
 * %0D, %0A and leave backslashes as they are (HTML standard, multipart/form-data encoding), so a
 * backslash is an ordinary character here (a Windows path), not an escape.
 */
function headerParam(value: string, key: string): string | undefined {
  const re = new RegExp(`(?:^|;)\\s*${key}\\s*=\\s*(?:"([^"]*)"|([^;]*))`, 'i')
  const m = re.exec(value)
  if (!m) return undefined
  if (m[1] !== undefined) return m[1].replace(/%22/g, '"').replace(/%0D/gi, '\r').replace(/%0A/gi, '\n')
  return m[2]?.trim()
}

/** RFC 5987 ext-value (filename*=UTF-8''…), or undefined. */
function extParam(value: string, key: string): string | undefined {
  const m = new RegExp(`(?:^|;)\\s*${key}\\*\\s*=\\s*([^;]*)`, 'i').exec(value)
  if (!m) return undefined
  const v = m[1]!.trim()
  const q = /^([\w-]+)'[^']*'(.*)$/.exec(v)
  if (!q || q[1]!.toLowerCase() !== 'utf-8') return undefined
  try {
    return decodeURIComponent(q[2]!)
  } catch {
    return undefined
  }
}

/**
 * The parts of a multipart/form-data body. Malformed input gives the parts read so far (possibly none);
 * never throws.
 */
export function parseMultipart(body: Uint8Array, boundary: string): MultipartPart[] {
  const parts: MultipartPart[] = []
  const delimiter = ascii(`--${boundary}`)
  const next = ascii(`\r\n--${boundary}`)
  const headerEnd = ascii('\r\n\r\n')
  let pos = indexOfBytes(body, delimiter, 0)
  if (pos < 0) return parts
  pos += delimiter.length
  for (;;) {
    // After a delimiter: "--" ends the body, CRLF starts a part.
    if (body[pos] === 0x2d && body[pos + 1] === 0x2d) break
    if (body[pos] !== 0x0d || body[pos + 1] !== 0x0a) break
    const headStart = pos + 2
    const headStop = indexOfBytes(body, headerEnd, headStart)
    if (headStop < 0) break
    const dataStart = headStop + headerEnd.length
    const dataStop = indexOfBytes(body, next, dataStart)
    if (dataStop < 0) break
    const headers = utf8.decode(body.subarray(headStart, headStop)).split('\r\n')
    let disposition = ''
    let contentType: string | undefined
    for (const h of headers) {
      const i = h.indexOf(':')
      if (i <= 0) continue
      const key = h.slice(0, i).trim().toLowerCase()
      const value = h.slice(i + 1).trim()
      if (key === 'content-disposition') disposition = value
      else if (key === 'content-type') contentType = value
    }
    const name = headerParam(disposition, 'name')
    if (/^form-data\b/i.test(disposition) && name !== undefined) {
      const filename = extParam(disposition, 'filename') ?? headerParam(disposition, 'filename')
      parts.push({ name, ...(filename !== undefined && { filename }), ...(contentType && { contentType }), data: body.subarray(dataStart, dataStop) })
    }
    pos = dataStop + next.length
  }
  return parts
}
