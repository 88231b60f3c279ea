import { CSV_FORMAT } from './csv'
import type { Digest } from './hash-stream'
import { countVerdicts } from './verdict'
import type { EvidenceReport } from './types'

// manifest.json of an evidence pack: what the pack covers and the SHA-256 of each other file in it. It is
// written last (the hashes are known only once the files have streamed), and its own SHA-256 goes into
// the evidence.exported event. Pure.

export const MANIFEST_FORMAT = 'boothbeat-evidence-pack/1'
export const PACK_FILES = { pdf: 'report.pdf', csv: 'environment-log.csv', manifest: 'manifest.json' } as const

export interface ManifestInput {
  report: EvidenceReport
  pdf: Digest
  csv: Digest & { rows: number; columns: string[] }
}

export function buildManifest({ report: r, pdf, csv }: ManifestInput) {
  return {
    format: MANIFEST_FORMAT,
    exportId: r.exportId,
    generatedAt: r.generatedAt,
    generatedBy: r.generatedBy,
    title: r.title,
    scope:
      r.scope.kind === 'job'
        ? { kind: 'job' as const, jobId: r.scope.jobId, jobNumber: r.scope.jobNumber, vehicle: r.jobs[0]?.vehicle ?? null }
        : { kind: 'booth' as const, boothId: r.scope.boothId },
    booths: r.booths,
    period: r.period,
    files: [
      { name: PACK_FILES.pdf, mediaType: 'application/pdf', bytes: pdf.bytes, sha256: pdf.sha256 },
      {
        name: PACK_FILES.csv,
        mediaType: CSV_FORMAT.mediaType,
        bytes: csv.bytes,
        sha256: csv.sha256,
        rows: csv.rows,
        columns: csv.columns,
        format: CSV_FORMAT,
      },
    ],
    counts: {
      readings: csv.rows,
      coats: r.coats.length,
      bakes: r.bakes.length,
      alerts: r.alerts.length,
      specRevisions: r.revisions.length,
      calibratedSensors: r.calibrations.filter((c) => c.effectiveAt !== null).length,
      signOffs: r.signOffs.length,
    },
    coatVerdicts: countVerdicts(r),
    coverage: { expectedRows: r.coverage.expectedRows, gaps: r.coverage.gaps.length, minGapMinutes: r.coverage.minGapMinutes },
    eventLog: { head: r.chain.head, verified: r.chain.verified, events: r.chain.count, ...(r.chain.verified ? {} : { brokenAt: r.chain.brokenAt, reason: r.chain.reason }) },
    units: r.units,
    notes: r.notes,
  }
}

export type Manifest = ReturnType<typeof buildManifest>

/** The manifest's bytes as they go into the zip (indented for people; hashed exactly as written). */
export function manifestText(m: Manifest): string {
  return `${JSON.stringify(m, null, 2)}\n`
}
