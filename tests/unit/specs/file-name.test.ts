import { describe, expect, it } from 'vitest'
import { contentDisposition, FALLBACK_FILE_NAME, looksLikePdf, MAX_FILE_NAME_LENGTH, sanitizeFileName } from '#shared/specs/file-name'

describe('sanitizeFileName', () => {
  it('keeps an ordinary name', () => {
    expect(sanitizeFileName('Clearcoat TDS v3.pdf')).toBe('Clearcoat TDS v3.pdf')
  })
  it('drops any path, POSIX or Windows', () => {
    expect(sanitizeFileName('../../etc/passwd.pdf')).toBe('passwd.pdf')
    expect(sanitizeFileName('C:\\Users\\paint\\TDS.pdf')).toBe('TDS.pdf')
    expect(sanitizeFileName('..')).toBe(FALLBACK_FILE_NAME)
  })
  it('removes control and direction-override characters, and reserved ones', () => {
    expect(sanitizeFileName('a\u0000b\r\nc.pdf')).toBe('abc.pdf')
    expect(sanitizeFileName('report\u202Efdp.exe')).toBe('reportfdp.exe.pdf')
    expect(sanitizeFileName('what?"*<>|.pdf')).toBe('what______.pdf')
  })
  it('adds .pdf, removes leading dots, falls back when nothing is left', () => {
    expect(sanitizeFileName('.hidden')).toBe('hidden.pdf')
    expect(sanitizeFileName('   ')).toBe(FALLBACK_FILE_NAME)
    expect(sanitizeFileName(undefined)).toBe(FALLBACK_FILE_NAME)
  })
  it('shortens a very long name and keeps the ending', () => {
    const long = sanitizeFileName(`${'ü'.repeat(500)}.pdf`)
    expect(Array.from(long)).toHaveLength(MAX_FILE_NAME_LENGTH)
    expect(long.endsWith('.pdf')).toBe(true)
  })
})

describe('contentDisposition', () => {
  it('gives an ASCII fallback and the UTF-8 name', () => {
    expect(contentDisposition('Fiche technique é.pdf')).toBe(`attachment; filename="Fiche technique _.pdf"; filename*=UTF-8''Fiche%20technique%20%C3%A9.pdf`)
  })
  it('cannot be broken out of with quotes', () => {
    const h = contentDisposition('a"; filename="evil.exe')
    expect(h.startsWith('attachment; filename="a_; filename=_evil.exe.pdf"')).toBe(true)
  })
})

describe('looksLikePdf', () => {
  it('checks the %PDF- header bytes', () => {
    expect(looksLikePdf(new TextEncoder().encode('%PDF-1.4\n%…'))).toBe(true)
    expect(looksLikePdf(new TextEncoder().encode('%PDF'))).toBe(false)
    expect(looksLikePdf(new TextEncoder().encode('<html>%PDF-1.4'))).toBe(false)
    expect(looksLikePdf(new Uint8Array())).toBe(false)
  })
})
