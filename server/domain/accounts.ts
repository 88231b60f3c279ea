import type { Kysely } from 'kysely'
import type { Database, Role, User } from '../db/database'
import { findUserByEmail, findUserById, insertUser, updateUser } from '../repositories/users'

// Account rules that are not about HTTP. Hashing comes in as functions so this stays testable and
// the server passes nuxt-auth-utils' scrypt helpers.
export interface Hasher {
  hash(plain: string): Promise<string>
  verify(hashed: string, plain: string): Promise<boolean>
}

export class AccountError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

let dummyHash: Promise<string> | undefined

/**
 * Checks e-mail and password. An unknown or disabled account still pays for one hash check, so
 * the answer takes the same time whether or not the account exists.
 */
export async function authenticate(db: Kysely<Database>, hasher: Hasher, email: string, password: string): Promise<User | undefined> {
  const user = await findUserByEmail(db, email)
  if (!user) {
    dummyHash ??= hasher.hash('not-a-real-password-for-timing')
    await hasher.verify(await dummyHash, password)
    return undefined
  }
  const ok = await hasher.verify(user.password_hash, password)
  if (!ok || user.disabled_at) return undefined
  return user
}

export interface NewAccount {
  email: string
  name: string
  role: Role
  password: string
}

export async function createAccount(db: Kysely<Database>, hasher: Hasher, a: NewAccount, opts: { mustChange: boolean }): Promise<User> {
  const existing = await findUserByEmail(db, a.email)
  if (existing) throw new AccountError(409, 'An account with this e-mail already exists')
  return insertUser(db, {
    email: a.email.trim().toLowerCase(),
    name: a.name.trim(),
    role: a.role,
    password_hash: await hasher.hash(a.password),
    must_change_password: opts.mustChange,
  })
}

export async function changePassword(db: Kysely<Database>, hasher: Hasher, userId: number, current: string, next: string): Promise<User> {
  const user = await findUserById(db, userId)
  if (!user) throw new AccountError(404, 'No such account')
  if (!(await hasher.verify(user.password_hash, current))) throw new AccountError(400, 'The current password is not right')
  if (current === next) throw new AccountError(400, 'Choose a password different from the current one')
  const updated = await updateUser(db, userId, { passwordHash: await hasher.hash(next), mustChangePassword: false })
  if (!updated) throw new AccountError(404, 'No such account')
  return updated
}

/** An admin's reset: the user must choose a new password at the next sign-in. */
export async function resetPassword(db: Kysely<Database>, hasher: Hasher, userId: number, temporary: string): Promise<User> {
  const updated = await updateUser(db, userId, { passwordHash: await hasher.hash(temporary), mustChangePassword: true })
  if (!updated) throw new AccountError(404, 'No such account')
  return updated
}

/** What the client may know about an account. */
export function publicUser(u: User) {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    mustChangePassword: u.must_change_password,
    disabled: u.disabled_at !== null,
    hasPin: u.pin_hash !== null,
    prefs: u.prefs,
    createdAt: u.created_at,
  }
}
