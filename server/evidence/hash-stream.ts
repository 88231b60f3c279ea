import { createHash } from 'node:crypto'
import { Transform, type TransformCallback } from 'node:stream'

export interface Digest {
  sha256: string
  bytes: number
}

/**
 * A pass-through that hashes (SHA-256) and counts the bytes going by, so a file's hash is known the moment
 * its last byte has been streamed, without keeping the file. `digest` settles when the input ends (or fails).
 * `beforeEnd`, when given, runs after the last byte and before the stream ends (e.g. to record the export
 * with its hash); an error there fails the stream.
 */
export class HashStream extends Transform {
  readonly digest: Promise<Digest>
  private hash = createHash('sha256')
  private count = 0
  private settle!: { resolve: (d: Digest) => void; reject: (e: Error) => void }

  constructor(private readonly beforeEnd?: (d: Digest) => Promise<void>) {
    super()
    this.digest = new Promise<Digest>((resolve, reject) => (this.settle = { resolve, reject }))
    // Nobody may be waiting on the digest when the stream fails: keep that from being an unhandled rejection.
    this.digest.catch(() => undefined)
    this.once('error', (e) => this.settle.reject(e))
    this.once('close', () => this.settle.reject(new Error('the stream closed before its end')))
  }

  override _transform(chunk: Buffer, _enc: BufferEncoding, cb: TransformCallback): void {
    this.hash.update(chunk)
    this.count += chunk.length
    cb(null, chunk)
  }

  override _flush(cb: TransformCallback): void {
    const d: Digest = { sha256: this.hash.digest('hex'), bytes: this.count }
    const after = this.beforeEnd ? this.beforeEnd(d) : Promise.resolve()
    after.then(
      () => {
        this.settle.resolve(d)
        cb()
      },
      (e: unknown) => cb(e instanceof Error ? e : new Error(String(e))),
    )
  }
}

export const sha256Hex = (data: string | Uint8Array) => createHash('sha256').update(data).digest('hex')
