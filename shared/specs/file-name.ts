// File names of uploaded data sheets: what the uploader's browser called the file is kept for display
// and for the download name only (the file itself is stored by its SHA-256), but it still must not carry
// a path, control or direction-override characters, or run to any length.

export const MAX_FILE_NAME_LENGTH = 120
export const FALLBACK_FILE_NAME = 'data-sheet.pdf'

// C0 / C1 controls, DEL, and the Unicode bidirectional overrides / isolates (which can make
// "evil‮fdp.exe" display as "evilexe.pdf").
// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069\ufeff]/g
// Characters Windows refuses in names, and quotes that would break a header if anything forgot to escape.
const RESERVED = /["*:<>?|]/g

/**
 * A safe display / download name: the last path segment only (both / and \), controls removed, reserved
 * characters replaced, whitespace collapsed, no leading dots, at most MAX_FILE_NAME_LENGTH characters
 * (code points) keeping a ".pdf" ending. Empty → FALLBACK_FILE_NAME.
 */
export function sanitizeFileName(raw: unknown): string {
  if (typeof raw !== 'string') return FALLBACK_FILE_NAME
  let name = raw.normalize('NFC')
  const lastSep = Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\'))
  if (lastSep >= 0) name = name.slice(lastSep + 1)
  name = name.replace(CONTROL, '').replace(RESERVED, '_').replace(/\s+/g, ' ').trim()
  name = name.replace(/^[.\s]+/, '').replace(/[.\s]+$/, '')
  if (!name) return FALLBACK_FILE_NAME
  if (!/\.pdf$/i.test(name)) name = `${name}.pdf`
  const chars = Array.from(name)
  if (chars.length > MAX_FILE_NAME_LENGTH) {
    const stem = chars.slice(0, chars.length - 4).slice(0, MAX_FILE_NAME_LENGTH - 4).join('').trimEnd()
    name = `${stem}.pdf`
  }
  return name
}

/** Content-Disposition value for a download: an ASCII fallback plus the RFC 5987 / 6266 UTF-8 name. */
export function contentDisposition(name: string, kind: 'attachment' | 'inline' = 'attachment'): string {
  const safe = sanitizeFileName(name)
  const ascii = safe.replace(/[^\x20-\x7e]/g, '_').replace(/[\\"]/g, '_')
  const encoded = encodeURIComponent(safe).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)
  return `${kind}; filename="${ascii}"; filename*=UTF-8''${encoded}`
}

/** True when the bytes start with the PDF header "%PDF-" (ISO 32000-1 §7.5.2). */
export function looksLikePdf(bytes: Uint8Array): boolean {
  const magic = [0x25, 0x50, 0x44, 0x46, 0x2d]
  if (bytes.length < magic.length) return false
  return magic.every((b, i) => bytes[i] === b)
}
