import type { Kysely } from 'kysely'
import type { Database, Role, User } from '../db/database'
import { findUserByEmail, findUserById, insertUser, updateUser, type UserChanges } from '../repositories/users'
import { recorded } from './event-log'

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

export interface Actor {
  id: number | null
  label: string
}

export async function createAccount(db: Kysely<Database>, hasher: Hasher, a: NewAccount, opts: { mustChange: boolean; actor: Actor }): Promise<User> {
  const existing = await findUserByEmail(db, a.email)
  if (existing) throw new AccountError(409, 'An account with this e-mail already exists')
  const passwordHash = await hasher.hash(a.password)
  return recorded(
    db,
    (tx) =>
      insertUser(tx, {
        email: a.email.trim().toLowerCase(),
        name: a.name.trim(),
        role: a.role,
        password_hash: passwordHash,
        must_change_password: opts.mustChange,
      }),
    (u) => ({ type: 'user.created', actor: opts.actor, subject: { type: 'user', id: u.id }, data: { email: u.email, name: u.name, role: u.role } }),
  )
}

/** Name, role or disabled state, by an admin. */
export async function changeAccount(db: Kysely<Database>, userId: number, c: Pick<UserChanges, 'name' | 'role' | 'disabled'>, actor: Actor): Promise<User> {
  const before = await findUserById(db, userId)
  if (!before) throw new AccountError(404, 'No such account')
  return recorded(
    db,
    async (tx) => (await updateUser(tx, userId, c))!,
    (u) => ({
      type: c.role && c.role !== before.role ? 'user.role_changed' : 'user.updated',
      actor,
      subject: { type: 'user', id: u.id },
      data: { changes: c, roleBefore: before.role, roleAfter: u.role, disabled: u.disabled_at !== null },
    }),
  )
}

export async function changePassword(db: Kysely<Database>, hasher: Hasher, userId: number, current: string, next: string): Promise<User> {
  const user = await findUserById(db, userId)
  if (!user) throw new AccountError(404, 'No such account')
  if (!(await hasher.verify(user.password_hash, current))) throw new AccountError(400, 'The current password is not right')
  if (current === next) throw new AccountError(400, 'Choose a password different from the current one')
  const hash = await hasher.hash(next)
  return recorded(
    db,
    async (tx) => (await updateUser(tx, userId, { passwordHash: hash, mustChangePassword: false }))!,
    (u) => ({ type: 'user.password_changed', actor: { id: u.id, label: `${u.name} (${u.role})` }, subject: { type: 'user', id: u.id }, data: {} }),
  )
}

/** An admin's reset: the user must choose a new password at the next sign-in. */
export async function resetPassword(db: Kysely<Database>, hasher: Hasher, userId: number, temporary: string, actor: Actor): Promise<User> {
  if (!(await findUserById(db, userId))) throw new AccountError(404, 'No such account')
  const hash = await hasher.hash(temporary)
  return recorded(
    db,
    async (tx) => (await updateUser(tx, userId, { passwordHash: hash, mustChangePassword: true }))!,
    (u) => ({ type: 'user.password_reset', actor, subject: { type: 'user', id: u.id }, data: {} }),
  )
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
