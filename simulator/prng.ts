// Small seeded pseudo-random number generator for the booth simulator.
// mulberry32 (a 32-bit state generator, public domain) is plenty for noise and cycle timing; it is not for
// anything security related. Seeds are strings or numbers, hashed with FNV-1a 32 and a final avalanche mix so
// that neighbouring seeds ("1", "2") give unrelated streams.

export type SeedInput = number | string

/** mulberry32: returns a function yielding uniform numbers in [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Hashes any number of parts into one 32-bit unsigned seed (FNV-1a 32, then the murmur3 finaliser). */
export function hashSeed(...parts: readonly SeedInput[]): number {
  const text = parts.map((p) => (typeof p === 'number' ? `n:${p}` : `s:${p}`)).join('\u0000')
  let h = 0x811c9dc5
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i)
    h = Math.imul(h, 0x01000193) >>> 0
  }
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b) >>> 0
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35) >>> 0
  h ^= h >>> 16
  return h >>> 0
}

/** Convenience wrapper around one mulberry32 stream. */
export class Random {
  private readonly source: () => number
  private spare: number | undefined

  constructor(seed: number) {
    this.source = mulberry32(seed)
  }

  /** Uniform in [0, 1). */
  next(): number {
    return this.source()
  }

  /** Uniform in [min, max). */
  uniform(min: number, max: number): number {
    return min + (max - min) * this.source()
  }

  /** Uniform integer in [min, max] (both inclusive). */
  int(min: number, max: number): number {
    return min + Math.floor(this.source() * (max - min + 1))
  }

  /** True with probability p. */
  chance(p: number): boolean {
    return this.source() < p
  }

  /** Standard normal deviate (Box–Muller, the second value of each pair is kept for the next call). */
  normal(mean = 0, sd = 1): number {
    if (this.spare !== undefined) {
      const z = this.spare
      this.spare = undefined
      return mean + sd * z
    }
    let u = 0
    while (u <= Number.MIN_VALUE) u = this.source()
    const v = this.source()
    const r = Math.sqrt(-2 * Math.log(u))
    this.spare = r * Math.sin(2 * Math.PI * v)
    return mean + sd * r * Math.cos(2 * Math.PI * v)
  }

  /** One element of a non-empty list. */
  pick<T>(items: readonly [T, ...T[]]): T {
    const item = items[Math.floor(this.source() * items.length)]
    return item === undefined ? items[0] : item
  }

  /** Picks a key by relative weight. */
  weighted<K extends string>(weights: Readonly<Record<K, number>>): K {
    const entries = Object.entries(weights) as [K, number][]
    const total = entries.reduce((sum, [, w]) => sum + w, 0)
    let x = this.source() * total
    for (const [key, w] of entries) {
      x -= w
      if (x < 0) return key
    }
    const last = entries[entries.length - 1]
    if (last === undefined) throw new RangeError('weighted() needs at least one entry')
    return last[0]
  }
}
