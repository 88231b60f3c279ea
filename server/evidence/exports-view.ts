import type { ExportListRow } from '../repositories/exports'

/** An exports row as the API returns it. */
export function exportView(r: ExportListRow, withManifest: boolean) {
  return {
    id: r.id,
    kind: r.kind,
    scope: r.scope,
    job: r.job_id !== null ? { id: r.job_id, number: r.job_number } : null,
    booth: r.booth_id !== null ? { id: r.booth_id, name: r.booth_name } : null,
    from: r.period_from.toISOString(),
    to: r.period_to.toISOString(),
    exportedAt: r.exported_at.toISOString(),
    exportedBy: r.exported_by_label,
    fileName: r.file_name,
    files: r.files,
    manifestSha256: r.manifest_sha256,
    readings: r.reading_count,
    eventSeq: r.event_seq,
    ...(withManifest ? { manifest: r.manifest } : {}),
  }
}
