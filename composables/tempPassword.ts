/** A temporary password an admin can read out: 3 groups of 4 from an alphabet without look-alikes (≈ 60 bits). */
export function suggestTemporaryPassword(): string {
  const alphabet = 'abcdefghjkmnpqrstuvwxyz23456789'
  const bytes = new Uint32Array(12)
  globalThis.crypto.getRandomValues(bytes)
  const chars = Array.from(bytes, (b) => alphabet[b % alphabet.length])
  return [chars.slice(0, 4), chars.slice(4, 8), chars.slice(8, 12)].map((g) => g.join('')).join('-')
}
