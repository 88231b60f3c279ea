import type { H3Event } from 'h3'
import { createError, getRequestProtocol } from 'h3'
import type { Role, User } from '../db/database'
import { findUserById } from '../repositories/users'
import { useDb } from './db'

export type SessionUser = Pick<User, 'id' | 'email' | 'name' | 'role' | 'must_change_password'>

/** Cookie flags per request: Secure only when the request came over HTTPS (directly or via a proxy). */
export function sessionCookieConfig(event: H3Event) {
  const secure = getRequestProtocol(event, { xForwardedProto: true }) === 'https'
  return { cookie: { secure, httpOnly: true, sameSite: 'lax' as const } }
}

/**
 * The one gate for routes: 401 when nobody is signed in, 403 when the role is not in `roles`
 * (empty = any signed-in role). The account is re-read so a disabled user or a changed role takes
 * effect at once, not when the cookie expires. A user who must change the password is held to the
 * few routes marked `allowPasswordChange`.
 */
export async function requireUser(
  event: H3Event,
  roles: readonly Role[] = [],
  opts: { allowPasswordChange?: boolean } = {},
): Promise<SessionUser> {
  const session = await getUserSession(event)
  if (!session.user) {
    // A paired booth screen is known but has no staff rights.
    if (session.screen) throw createError({ statusCode: 403, message: 'A booth screen cannot do this' })
    throw createError({ statusCode: 401, message: 'Sign in first' })
  }
  const user = await findUserById(useDb(), session.user.id)
  if (!user || user.disabled_at) {
    await clearUserSession(event)
    throw createError({ statusCode: 401, message: 'This account is not active' })
  }
  if (user.must_change_password && !opts.allowPasswordChange) {
    throw createError({ statusCode: 403, message: 'Change your password before you go on' })
  }
  if (roles.length && !roles.includes(user.role)) {
    throw createError({ statusCode: 403, message: 'Your role does not allow this' })
  }
  return user
}

export const STAFF: readonly Role[] = ['admin', 'manager', 'tech', 'painter', 'auditor']
export const MANAGERS: readonly Role[] = ['admin', 'manager']
export const RECORDERS: readonly Role[] = ['admin', 'manager', 'tech']

/**
 * Signed-in staff may watch any booth; a paired booth screen only its own booth.
 * Returns the user when there is one.
 */
export async function requireBoothViewer(event: H3Event, boothId: number): Promise<SessionUser | null> {
  const session = await getUserSession(event)
  if (!session.user && session.screen) {
    if (session.screen.boothId !== boothId) throw createError({ statusCode: 403, message: 'This screen is paired to another booth' })
    return null
  }
  return requireUser(event, STAFF)
}
