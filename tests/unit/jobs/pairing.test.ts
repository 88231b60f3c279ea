import { describe, expect, it } from 'vitest'
import {
  generatePairingCode,
  hashPairingCode,
  normalisePairingCode,
  PAIRING_ALPHABET,
  PAIRING_CODE_LENGTH,
  pairingCodeTtlSeconds,
} from '../../../server/domain/pairing'

describe('pairing codes', () => {
  it('use an alphabet without look-alike characters', () => {
    // Pairs that are easily confused on screens and handwritten notes (common practice, e.g. Crockford's base 32).
    for (const ch of '0O1IL2Z5S8B6GDQ') expect(PAIRING_ALPHABET).not.toContain(ch)
    expect(new Set(PAIRING_ALPHABET).size).toBe(PAIRING_ALPHABET.length)
    expect(PAIRING_ALPHABET).toMatch(/^[A-Z0-9]+$/)
  })

  it('are 6 characters from that alphabet, and every character can come up', () => {
    const seen = new Set<string>()
    for (let i = 0; i < 400; i++) {
      const c = generatePairingCode()
      expect(c).toHaveLength(PAIRING_CODE_LENGTH)
      for (const ch of c) {
        expect(PAIRING_ALPHABET).toContain(ch)
        seen.add(ch)
      }
    }
    expect(seen.size).toBe(PAIRING_ALPHABET.length)
  })

  it('maps the random source onto the alphabet without bias at the ends', () => {
    expect(generatePairingCode(() => 0)).toBe(PAIRING_ALPHABET[0]!.repeat(6))
    expect(generatePairingCode((max) => max - 1)).toBe(PAIRING_ALPHABET.at(-1)!.repeat(6))
  })

  it('accept what a person types: lower case, spaces, dashes; refuse anything else', () => {
    expect(normalisePairingCode('ace-f3 4')).toBe('ACEF34')
    expect(normalisePairingCode('ACEF3')).toBeNull()
    expect(normalisePairingCode('ACEF3O')).toBeNull() // O is not in the alphabet
    expect(normalisePairingCode('ACEF347')).toBeNull()
  })

  it('are stored as a hash that does not contain the code and differs per code', () => {
    const h = hashPairingCode('ACEF34')
    expect(h).toMatch(/^[0-9a-f]{64}$/)
    expect(h).not.toContain('ACEF34')
    expect(hashPairingCode('ACEF34')).toBe(h)
    expect(hashPairingCode('ACEF37')).not.toBe(h)
  })

  it('live 10 minutes unless PAIRING_CODE_TTL_SECONDS says otherwise (within 1 s … 1 day)', () => {
    expect(pairingCodeTtlSeconds({})).toBe(600)
    expect(pairingCodeTtlSeconds({ PAIRING_CODE_TTL_SECONDS: '3' })).toBe(3)
    expect(pairingCodeTtlSeconds({ PAIRING_CODE_TTL_SECONDS: '0' })).toBe(600)
    expect(pairingCodeTtlSeconds({ PAIRING_CODE_TTL_SECONDS: 'soon' })).toBe(600)
    expect(pairingCodeTtlSeconds({ PAIRING_CODE_TTL_SECONDS: '999999' })).toBe(600)
  })
})
