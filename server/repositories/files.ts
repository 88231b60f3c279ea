import { createReadStream, type ReadStream } from 'node:fs'
import { mkdir, rename, rm, stat, writeFile } from 'node:fs/promises'
import { randomBytes } from 'node:crypto'
import { join, resolve } from 'node:path'
import type { Insertable, Kysely, Selectable } from 'kysely'
import type { Database } from '../db/database'
import type { FilesTable } from '../db/tables/specs'

// Uploaded files: metadata in the `files` table, bytes on disk under UPLOAD_DIR (never under public/),
// named by their SHA-256 so the same bytes are stored once.
type Db = Kysely<Database>
export type StoredFile = Selectable<FilesTable>
export type NewStoredFile = Insertable<FilesTable>

export const SHA256_HEX = /^[0-9a-f]{64}$/

export function findFile(db: Db, sha256: string): Promise<StoredFile | undefined> {
  return db.selectFrom('files').selectAll().where('sha256', '=', sha256).executeTakeFirst()
}

/** Inserts the metadata unless these bytes are already known; returns the stored row either way. */
export async function insertFileIfAbsent(db: Db, file: NewStoredFile): Promise<{ file: StoredFile; created: boolean }> {
  const inserted = await db.insertInto('files').values(file).onConflict((oc) => oc.column('sha256').doNothing()).returningAll().executeTakeFirst()
  if (inserted) return { file: inserted, created: true }
  const existing = await db.selectFrom('files').selectAll().where('sha256', '=', file.sha256).executeTakeFirstOrThrow()
  return { file: existing, created: false }
}

/** Where the bytes of a file live: UPLOAD_DIR/ab/abcdef… (two-level fan-out). */
export function blobPath(uploadDir: string, sha256: string): string {
  if (!SHA256_HEX.test(sha256)) throw new Error('not a SHA-256')
  return join(resolve(uploadDir), sha256.slice(0, 2), sha256)
}

/** Writes the bytes once (temporary name, then rename, so a reader never sees half a file). */
export async function storeBlob(uploadDir: string, sha256: string, data: Uint8Array): Promise<void> {
  const target = blobPath(uploadDir, sha256)
  const existing = await stat(target).catch(() => null)
  if (existing && existing.size === data.byteLength) return
  await mkdir(join(resolve(uploadDir), sha256.slice(0, 2)), { recursive: true })
  const tmp = `${target}.${randomBytes(6).toString('hex')}.tmp`
  try {
    await writeFile(tmp, data, { flag: 'wx', mode: 0o640 })
    await rename(tmp, target)
  } catch (e) {
    await rm(tmp, { force: true })
    throw e
  }
}

/** A read stream of the bytes and their size, or null when the file is missing on disk. */
export async function openBlob(uploadDir: string, sha256: string): Promise<{ stream: ReadStream; size: number } | null> {
  const path = blobPath(uploadDir, sha256)
  const st = await stat(path).catch(() => null)
  if (!st || !st.isFile()) return null
  return { stream: createReadStream(path), size: st.size }
}
