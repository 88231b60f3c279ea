import { randomUUID } from 'node:crypto'
import { pipeline } from 'node:stream'
import type { Readable } from 'node:stream'
import archiver from 'archiver'
import type { H3Event } from 'h3'
import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { ExportFile, ExportKind } from '../db/tables/evidence'
import { actorOf, appendEvent } from '../domain/event-log'
import { insertExport } from '../repositories/exports'
import { usePool } from '../utils/db'
import { environmentLog } from './environment-log'
import { EVIDENCE_FONTS } from './fonts'
import { HashStream, sha256Hex, type Digest } from './hash-stream'
import { buildManifest, manifestText, PACK_FILES } from './manifest'
import { renderReportPdf } from './pdf'
import { buildReport, resolveScope, type ResolvedScope, type Who } from './report'
import type { EvidenceScope } from './types'

// Evidence downloads, streamed to the response:
// - the pack: one zip (archiver, deflate) of report.pdf, environment-log.csv and, last, manifest.json. The
//   PDF and the CSV go through hashing pass-throughs on their way into the zip, so their SHA-256 is known
//   when their last byte is written and nothing is held whole in memory; then the export is recorded (event
//   + exports row, one transaction) with the manifest's hash, then the manifest is appended and the zip closed.
// - the CSV alone, recorded the same way just before its last byte leaves.
// A client that goes away mid-way stops the reads; nothing is recorded for a download that did not finish
// producing its files. A failure after the first byte can only cut the connection (the status is already
// sent), which the client sees as a broken download.

type Db = Kysely<Database>

export interface RecordInput {
  id: string
  kind: ExportKind
  scope: ResolvedScope
  by: Who
  fileName: string
  files: ExportFile[]
  manifestSha256: string | null
  manifest: string | null
  readings: number
}

/** The export's event (evidence.exported) and its exports row, in one transaction. */
export async function recordExport(db: Db, e: RecordInput): Promise<{ seq: number; hash: string }> {
  return db.transaction().execute(async (tx) => {
    const ev = await appendEvent(tx, {
      type: 'evidence.exported',
      actor: actorOf(e.by),
      subject: e.scope.job ? { type: 'job', id: e.scope.job.id } : { type: 'booth', id: e.scope.booths[0]!.id },
      data: {
        exportId: e.id,
        kind: e.kind,
        scope: e.scope.kind,
        jobId: e.scope.job?.id ?? null,
        jobNumber: e.scope.job?.number ?? null,
        boothIds: e.scope.booths.map((b) => b.id),
        from: e.scope.from.toISOString(),
        to: e.scope.to.toISOString(),
        fileName: e.fileName,
        manifestSha256: e.manifestSha256,
        files: e.files,
        readings: e.readings,
      },
    })
    await insertExport(tx, {
      id: e.id,
      kind: e.kind,
      scope: e.scope.kind,
      job_id: e.scope.job?.id ?? null,
      booth_id: e.scope.kind === 'booth' ? e.scope.booths[0]!.id : (e.scope.job?.booth_id ?? e.scope.booths[0]?.id ?? null),
      period_from: e.scope.from,
      period_to: e.scope.to,
      exported_by: e.by.id,
      exported_by_label: actorOf(e.by).label,
      file_name: e.fileName,
      files: JSON.stringify(e.files),
      manifest_sha256: e.manifestSha256,
      manifest: e.manifest,
      reading_count: e.readings,
      event_seq: ev.seq,
    })
    return ev
  })
}

function attachment(fileName: string): string {
  return `attachment; filename="${fileName.replace(/[^A-Za-z0-9._-]/g, '_')}"`
}

/** Streams `body` as the response; resolves when it is done or broken. */
function respond(event: H3Event, body: Readable, headers: Record<string, string>, onAbort: () => void): Promise<void> {
  const res = event.node.res
  res.statusCode = 200
  for (const [k, v] of Object.entries(headers)) res.setHeader(k, v)
  res.on('close', () => {
    if (!res.writableFinished) onAbort()
  })
  return new Promise((resolve) => {
    pipeline(body, res, (err) => {
      if (err && (err as { code?: string }).code !== 'ERR_STREAM_PREMATURE_CLOSE') console.warn(`[evidence] download cut: ${err.message}`)
      resolve()
    })
  })
}

/** Resolves the scope and builds the report first, so a bad request still gets a plain 4xx answer. */
export async function sendEvidencePack(event: H3Event, db: Db, scope: EvidenceScope, by: Who): Promise<void> {
  const now = Date.now()
  const resolved = await resolveScope(db, scope, now)
  const exportId = randomUUID()
  const report = await buildReport(db, resolved, by, exportId, now)
  const log = await environmentLog(db, usePool(), report.booths, resolved.from, resolved.to)
  const fileName = `evidence-${resolved.stem}.zip`
  const date = new Date(report.generatedAt)

  const pdfHash = new HashStream()
  const csvHash = new HashStream()
  const pdf = renderReportPdf(report, EVIDENCE_FONTS) as unknown as Readable
  pipeline(pdf, pdfHash, () => undefined)
  pipeline(log.stream, csvHash, () => undefined)
  const archive = archiver('zip', { zlib: { level: 6 } })
  archive.on('warning', (w) => console.warn(`[evidence] zip: ${w.message}`))
  archive.append(pdfHash, { name: PACK_FILES.pdf, date })
  archive.append(csvHash, { name: PACK_FILES.csv, date })

  let aborted = false
  const abort = () => {
    aborted = true
    log.stream.destroy()
    archive.abort()
  }
  const finish = async () => {
    const [pdfDigest, csvDigest]: Digest[] = await Promise.all([pdfHash.digest, csvHash.digest])
    if (aborted) return
    const manifest = buildManifest({ report, pdf: pdfDigest!, csv: { ...csvDigest!, rows: log.rows(), columns: log.columns } })
    const text = manifestText(manifest)
    const manifestSha256 = sha256Hex(text)
    await recordExport(db, {
      id: exportId,
      kind: 'pack',
      scope: resolved,
      by,
      fileName,
      files: manifest.files.map((f) => ({ name: f.name, sha256: f.sha256, bytes: f.bytes })),
      manifestSha256,
      manifest: text,
      readings: log.rows(),
    })
    archive.append(Buffer.from(text, 'utf8'), { name: PACK_FILES.manifest, date })
    await archive.finalize()
  }
  finish().catch((e: unknown) => {
    if (aborted) return
    console.error('[evidence] pack failed:', e)
    archive.destroy(e instanceof Error ? e : new Error(String(e)))
  })
  await respond(
    event,
    archive,
    { 'content-type': 'application/zip', 'content-disposition': attachment(fileName), 'cache-control': 'no-store', 'x-export-id': exportId },
    abort,
  )
}

/** The environment log alone, as CSV; recorded (event + exports row) just before its last byte. */
export async function sendEnvironmentLog(event: H3Event, db: Db, scope: EvidenceScope, by: Who): Promise<void> {
  const now = Date.now()
  const resolved = await resolveScope(db, scope, now)
  const exportId = randomUUID()
  const log = await environmentLog(db, usePool(), resolved.booths, resolved.from, resolved.to)
  const fileName = `environment-log-${resolved.stem}.csv`
  const hash = new HashStream((d) =>
    recordExport(db, {
      id: exportId,
      kind: 'csv',
      scope: resolved,
      by,
      fileName,
      files: [{ name: fileName, sha256: d.sha256, bytes: d.bytes }],
      manifestSha256: null,
      manifest: null,
      readings: log.rows(),
    }).then(() => undefined),
  )
  const body = pipeline(log.stream, hash, () => undefined)
  await respond(
    event,
    body,
    { 'content-type': 'text/csv; charset=utf-8; header=present', 'content-disposition': attachment(fileName), 'cache-control': 'no-store', 'x-export-id': exportId },
    () => log.stream.destroy(),
  )
}
