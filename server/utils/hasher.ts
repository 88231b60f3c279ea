import type { Hasher } from '../domain/accounts'

/** nuxt-auth-utils' scrypt helpers behind the domain's Hasher interface. */
export const passwordHasher: Hasher = {
  hash: (plain) => hashPassword(plain),
  verify: (hashed, plain) => verifyPassword(hashed, plain),
}
