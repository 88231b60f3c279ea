import { describe, expect, it } from 'vitest'
import { multipartBoundary, parseMultipart } from '#shared/specs/multipart'

const enc = new TextEncoder()

/** Lets the platform's own FormData encoder write the body, so the parser reads what browsers send. */
async function encode(form: FormData): Promise<{ body: Uint8Array; type: string }> {
  const res = new Response(form)
  return { body: new Uint8Array(await res.arrayBuffer()), type: res.headers.get('content-type')! }
}

describe('parseMultipart', () => {
  it('reads fields and files as the platform encodes them, with UTF-8 names and awkward characters', async () => {
    const form = new FormData()
    form.append('note', 'hello')
    const bytes = enc.encode('%PDF-1.4\r\n--not-a-boundary\r\n\r\nbinary\u0000data')
    form.append('file', new Blob([bytes]), 'Fiche "é";=x.pdf')
    const { body, type } = await encode(form)
    const boundary = multipartBoundary(type)
    expect(boundary).toBeTruthy()
    const parts = parseMultipart(body, boundary!)
    expect(parts.map((p) => p.name)).toEqual(['note', 'file'])
    expect(new TextDecoder().decode(parts[0]!.data)).toBe('hello')
    expect(parts[0]!.filename).toBeUndefined()
    expect(parts[1]!.filename).toBe('Fiche "é";=x.pdf')
    expect(parts[1]!.data).toEqual(bytes)
  })

  it('reads an RFC 5987 filename* and a hand-written body', () => {
    const b = 'XyZ'
    const body = enc.encode(
      `--${b}\r\nContent-Disposition: form-data; name="file"; filename="fallback.pdf"; filename*=UTF-8''na%C3%AFve.pdf\r\nContent-Type: application/pdf\r\n\r\n%PDF-1.7\r\n--${b}--\r\n`,
    )
    const [p] = parseMultipart(body, b)
    expect(p).toMatchObject({ name: 'file', filename: 'naïve.pdf', contentType: 'application/pdf' })
    expect(new TextDecoder().decode(p!.data)).toBe('%PDF-1.7')
  })

  it('keeps backslashes of a Windows path (browsers do not escape them)', () => {
    const body = enc.encode('--b\r\nContent-Disposition: form-data; name="file"; filename="C:\\Users\\x\\tds.pdf"\r\n\r\n%PDF-\r\n--b--')
    expect(parseMultipart(body, 'b')[0]!.filename).toBe('C:\\Users\\x\\tds.pdf')
  })

  it('gives nothing for malformed input, never throws', () => {
    expect(parseMultipart(enc.encode('garbage'), 'b')).toEqual([])
    expect(parseMultipart(enc.encode('--b\r\nContent-Disposition: form-data; name="a"\r\n\r\nno end'), 'b')).toEqual([])
    expect(multipartBoundary('application/json')).toBeNull()
    expect(multipartBoundary('multipart/form-data; boundary="quoted b"')).toBe('quoted b')
  })
})
