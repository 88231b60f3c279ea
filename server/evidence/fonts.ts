import type { PdfFonts } from './pdf'
import regularRaw from 'raw:./fonts/LiberationSans-Regular.ttf'
import boldRaw from 'raw:./fonts/LiberationSans-Bold.ttf'

// The report's fonts: Liberation Sans Regular and Bold (SIL Open Font License 1.1, ./fonts/LICENSE-Liberation.txt),
// metric-compatible with Arial/Helvetica, with the symbols the report uses (°, →, ≥, −). @fontsource-variable/inter
// ships only woff2, which pdfkit cannot embed; these TrueType files came from pdfjs-dist's standard fonts.
// Nitro's raw plugin inlines them into the server bundle as bytes (raw: imports of a binary file give a
// Uint8Array; the ambient *.ttf typing says string), so the built server needs no font files on disk.
const bytes = (x: unknown): Uint8Array => (typeof x === 'string' ? Buffer.from(x, 'binary') : (x as Uint8Array))

export const EVIDENCE_FONTS: PdfFonts = { regular: bytes(regularRaw), bold: bytes(boldRaw) }
