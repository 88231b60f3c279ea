import type { Kysely } from 'kysely'
import type { Database, NewUser, Role, User, UserPrefs } from '../db/database'

// Kysely access to users. Callers pass the db (or a transaction) so actions stay atomic.
type Db = Kysely<Database>

export function findUserByEmail(db: Db, email: string): Promise<User | undefined> {
  return db.selectFrom('users').selectAll().where('email', '=', email.trim().toLowerCase()).executeTakeFirst()
}

export function findUserById(db: Db, id: number): Promise<User | undefined> {
  return db.selectFrom('users').selectAll().where('id', '=', id).executeTakeFirst()
}

export function listUsers(db: Db): Promise<User[]> {
  return db.selectFrom('users').selectAll().orderBy('name').execute()
}

export function listUsersByRole(db: Db, roles: Role[]): Promise<User[]> {
  return db.selectFrom('users').selectAll().where('role', 'in', roles).where('disabled_at', 'is', null).execute()
}

export function insertUser(db: Db, user: NewUser): Promise<User> {
  return db.insertInto('users').values(user).returningAll().executeTakeFirstOrThrow()
}

export interface UserChanges {
  name?: string
  role?: Role
  disabled?: boolean
  passwordHash?: string
  mustChangePassword?: boolean
  pinHash?: string | null
  prefs?: UserPrefs
}

export function updateUser(db: Db, id: number, c: UserChanges): Promise<User | undefined> {
  return db
    .updateTable('users')
    .set({
      ...(c.name !== undefined && { name: c.name }),
      ...(c.role !== undefined && { role: c.role }),
      ...(c.disabled !== undefined && { disabled_at: c.disabled ? new Date() : null }),
      ...(c.passwordHash !== undefined && { password_hash: c.passwordHash }),
      ...(c.mustChangePassword !== undefined && { must_change_password: c.mustChangePassword }),
      ...(c.pinHash !== undefined && { pin_hash: c.pinHash }),
      ...(c.prefs !== undefined && { prefs: JSON.stringify(c.prefs) }),
      updated_at: new Date(),
    })
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst()
}

export async function countUsers(db: Db): Promise<number> {
  const r = await db.selectFrom('users').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
  return Number(r.n)
}
