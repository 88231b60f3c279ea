import { createHash, randomInt } from 'node:crypto'
import type { Kysely } from 'kysely'
import type { Database, Role, User } from '../db/database'
import type { Hasher } from './accounts'
import { appendEvent, actorOf } from './event-log'
import { findBooth } from '../repositories/booths'
import { claimPairingCode, deleteStalePairingCodes, insertPairingCode } from '../repositories/pairing'
import { findUserById, listUsersByRole, updateUser } from '../repositories/users'
import { assertNotLimited, clearAttempts, spendAttempt } from '../utils/rate-limit'

// Booth screens: a manager issues a pairing code for a booth, the screen enters it and gets a
// session limited to that booth (no user). Painters then act on the screen with their PIN.

/**
 * Capitals and digits that cannot be mistaken for one another on a screen or a scribbled note:
 * no 0/O/D/Q, 1/I/L, 2/Z, 5/S, 6/G, 8/B. 21 symbols, 6 long: 21⁶ ≈ 86 million codes.
 */
export const PAIRING_ALPHABET = 'ACEFHJKMNPRTUVWXY3479'
export const PAIRING_CODE_LENGTH = 6
export const DEFAULT_PAIRING_TTL_S = 600
/** Roles that may record coats and mixes (a painter, a lead painter / tech, the manager, admin). */
export const ACTOR_ROLES: readonly Role[] = ['admin', 'manager', 'tech', 'painter']

export class ScreenError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

/** A random code from PAIRING_ALPHABET (crypto.randomInt: uniform, no modulo bias). */
export function generatePairingCode(random: (max: number) => number = randomInt): string {
  let s = ''
  for (let i = 0; i < PAIRING_CODE_LENGTH; i++) s += PAIRING_ALPHABET[random(PAIRING_ALPHABET.length)]
  return s
}

/** What a person typed → the code: upper case, spaces and dashes dropped; null when it cannot be a code. */
export function normalisePairingCode(typed: string): string | null {
  const s = typed.toUpperCase().replace(/[\s-]/g, '')
  if (s.length !== PAIRING_CODE_LENGTH) return null
  for (const ch of s) if (!PAIRING_ALPHABET.includes(ch)) return null
  return s
}

/**
 * Only a hash is stored. A plain SHA-256 is enough here (unlike passwords): a code lives minutes,
 * is used once and guessing is rate-limited, so a leaked table gives nothing usable.
 */
export function hashPairingCode(code: string): string {
  return createHash('sha256').update(`boothbeat-pairing\n${code}`).digest('hex')
}

/** PAIRING_CODE_TTL_SECONDS (1…86 400; tests use a few seconds), else 10 minutes. */
export function pairingCodeTtlSeconds(env: Record<string, string | undefined> = process.env): number {
  const n = Number(env.PAIRING_CODE_TTL_SECONDS)
  return Number.isInteger(n) && n >= 1 && n <= 86_400 ? n : DEFAULT_PAIRING_TTL_S
}

export async function issuePairingCode(
  db: Kysely<Database>,
  boothId: number,
  by: { id: number; name: string; role: string },
  now = new Date(),
): Promise<{ code: string; boothId: number; expiresAt: string }> {
  const booth = await findBooth(db, boothId)
  if (!booth) throw new ScreenError(404, 'No such booth')
  await deleteStalePairingCodes(db, now)
  const expiresAt = new Date(now.getTime() + pairingCodeTtlSeconds() * 1000)
  // A clash with a live code is astronomically rare; try again rather than fail.
  for (let attempt = 0; ; attempt++) {
    const code = generatePairingCode()
    try {
      await db.transaction().execute(async (tx) => {
        const row = await insertPairingCode(tx, { boothId, codeHash: hashPairingCode(code), createdBy: by.id, expiresAt })
        await appendEvent(tx, {
          type: 'screen.pairing_code_issued',
          actor: actorOf(by),
          subject: { type: 'booth', id: boothId },
          data: { pairingCodeId: row.id, expiresAt: expiresAt.toISOString() },
          at: now,
        })
      })
      return { code, boothId, expiresAt: expiresAt.toISOString() }
    } catch (e) {
      if ((e as { code?: string }).code !== '23505' || attempt >= 3) throw e
    }
  }
}

/** Uses a pairing code: the booth it pairs to, or 400 when the code is unknown, used or expired. */
export async function pairScreen(db: Kysely<Database>, typed: string, now = new Date()): Promise<{ boothId: number; boothName: string }> {
  const code = normalisePairingCode(typed)
  const fail = new ScreenError(400, 'That pairing code is not valid or has expired. Ask a manager for a new one.')
  if (!code) throw fail
  const booth = await db.transaction().execute(async (tx) => {
    const claimed = await claimPairingCode(tx, hashPairingCode(code), now)
    if (!claimed) return null
    const b = await findBooth(tx, claimed.booth_id)
    await appendEvent(tx, {
      type: 'screen.paired',
      actor: { id: null, label: `booth screen (${b?.name ?? claimed.booth_id})` },
      subject: { type: 'booth', id: claimed.booth_id },
      data: { pairingCodeId: claimed.id },
      at: now,
    })
    return { boothId: claimed.booth_id, boothName: b?.name ?? '' }
  })
  if (!booth) throw fail
  return booth
}

// ── who acts ────────────────────────────────────────────────────────────────────────────────────

/** The parts of a nuxt-auth-utils session this module reads. */
export interface SessionLike {
  user?: { id: number; role?: string }
  screen?: { boothId: number; pairedAt: number }
}

/** Attempt counting for PINs (server/utils/rate-limit.ts in the app; a fake in tests). */
export interface AttemptLimiter {
  assertNotLimited(key: string): Promise<void>
  spendAttempt(key: string): Promise<void>
  clearAttempts(key: string): Promise<void>
}

/** PIN attempts in the shared `pin` limit (server/utils/rate-limit.ts): 5 per painter per 10 min. */
export const pinLimiter: AttemptLimiter = {
  assertNotLimited: (key) => assertNotLimited('pin', key),
  spendAttempt: (key) => spendAttempt('pin', key),
  clearAttempts: (key) => clearAttempts('pin', key),
}

export interface ActorCredentials {
  painterId?: number
  pin?: string
}

export interface Actor {
  id: number
  name: string
  role: Role
  /** 'session': a signed-in user acting in the web app; 'screen': a PIN on a paired booth screen. */
  via: 'session' | 'screen'
}

export const pinLimitKey = (userId: number) => `painter:${userId}`

const mayAct = (u: User | undefined): u is User => !!u && !u.disabled_at && ACTOR_ROLES.includes(u.role)

/** 401 unless there is a user or a paired screen. Routes call this before reading the body. */
/** The gate before validation: someone who may act at all (the account is re-checked afterwards). */
export function assertSessionOrScreen(session: SessionLike): void {
  if (!session.user && !session.screen) throw new ScreenError(401, 'Sign in, or pair this screen with a booth first')
  if (session.user?.role && !(ACTOR_ROLES as readonly string[]).includes(session.user.role)) throw new ScreenError(403, 'Your role does not allow this')
}

/**
 * The person behind an action on booth `boothId`. A signed-in user acts as themselves (their role
 * must allow recording). A paired screen acts only on its own booth, for the painter whose PIN was
 * entered; wrong PINs count against that painter (429 after too many).
 */
export async function resolveActor(
  db: Kysely<Database>,
  deps: { hasher: Hasher; limiter: AttemptLimiter },
  session: SessionLike,
  boothId: number | null,
  creds: ActorCredentials,
): Promise<Actor> {
  if (session.user) {
    const u = await findUserById(db, session.user.id)
    if (!u || u.disabled_at) throw new ScreenError(401, 'This account is not active')
    if (u.must_change_password) throw new ScreenError(403, 'Change your password before you go on')
    if (!ACTOR_ROLES.includes(u.role)) throw new ScreenError(403, 'Your role does not allow this')
    return { id: u.id, name: u.name, role: u.role, via: 'session' }
  }
  if (!session.screen) throw new ScreenError(401, 'Sign in, or pair this screen with a booth first')
  if (boothId === null || session.screen.boothId !== boothId) throw new ScreenError(403, 'This screen is paired to another booth')
  if (!creds.painterId || !creds.pin) throw new ScreenError(400, 'Tap your name and enter your PIN first')
  const u = await checkPin(db, deps, creds.painterId, creds.pin)
  return { id: u.id, name: u.name, role: u.role, via: 'screen' }
}

/** Checks a painter's PIN, counting failures per painter (429 when used up). */
export async function checkPin(db: Kysely<Database>, deps: { hasher: Hasher; limiter: AttemptLimiter }, painterId: number, pin: string): Promise<User> {
  const key = pinLimitKey(painterId)
  await deps.limiter.assertNotLimited(key)
  const u = await findUserById(db, painterId)
  if (mayAct(u) && !u.pin_hash) throw new ScreenError(403, `${u.name} has no PIN yet. Set one on your profile first.`)
  const ok = mayAct(u) && u.pin_hash ? await deps.hasher.verify(u.pin_hash, pin) : false
  if (!ok || !u) {
    await deps.limiter.spendAttempt(key)
    throw new ScreenError(403, 'That PIN is not right. Try again.')
  }
  await deps.limiter.clearAttempts(key)
  return u
}

/** People who can act on a booth screen: may record and have a PIN. Assigned painter first. */
export async function screenPeople(db: Kysely<Database>, firstId: number | null = null): Promise<{ id: number; name: string; role: Role }[]> {
  const users = await listUsersByRole(db, [...ACTOR_ROLES])
  return users
    .filter((u) => u.pin_hash !== null)
    .sort((a, b) => Number(b.id === firstId) - Number(a.id === firstId) || Number(b.role === 'painter') - Number(a.role === 'painter') || a.name.localeCompare(b.name))
    .map((u) => ({ id: u.id, name: u.name, role: u.role }))
}

/** Sets (or replaces) the user's PIN; only its hash is kept. */
export async function setPin(db: Kysely<Database>, hasher: Hasher, user: { id: number; name: string; role: string }, pin: string): Promise<void> {
  const pinHash = await hasher.hash(pin)
  await db.transaction().execute(async (tx) => {
    const updated = await updateUser(tx, user.id, { pinHash })
    if (!updated) throw new ScreenError(404, 'No such account')
    await appendEvent(tx, { type: 'user.pin_set', actor: actorOf(user), subject: { type: 'user', id: user.id }, data: {} })
  })
}
