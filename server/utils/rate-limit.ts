import { createError } from 'h3'
import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible'
import { usePool } from './db'

// Attempt limits kept in PostgreSQL (table rate_limits) so several instances share them.
type Limiter = RateLimiterPostgres

const limiters = new Map<string, Limiter>()

function limiter(name: string, points: number, durationSec: number, blockSec: number): Limiter {
  let l = limiters.get(name)
  if (!l) {
    l = new RateLimiterPostgres({
      storeClient: usePool(),
      storeType: 'pool',
      tableName: 'rate_limits',
      tableCreated: true,
      keyPrefix: name,
      points,
      duration: durationSec,
      blockDuration: blockSec,
    })
    limiters.set(name, l)
  }
  return l
}

export const LIMITS = {
  // Five wrong passwords for one account in 15 minutes lock it for 15 minutes (common practice).
  loginAccount: { points: 5, duration: 15 * 60, block: 15 * 60 },
  // An address gets more room: a shop shares one address among many people.
  loginAddress: { points: 30, duration: 15 * 60, block: 15 * 60 },
  // Booth screen PINs are short, so fewer tries.
  pin: { points: 5, duration: 10 * 60, block: 10 * 60 },
} as const

export type LimitName = keyof typeof LIMITS

function tooMany(res: RateLimiterRes) {
  const retryAfter = Math.max(1, Math.ceil(res.msBeforeNext / 1000))
  return createError({
    statusCode: 429,
    message: `Too many attempts. Try again in ${retryAfter} s.`,
    data: { retryAfter },
  })
}

/** Throws 429 (with Retry-After) when the key has no attempts left; does not spend one. */
export async function assertNotLimited(name: LimitName, key: string): Promise<void> {
  const cfg = LIMITS[name]
  const res = await limiter(name, cfg.points, cfg.duration, cfg.block).get(key)
  if (res && res.remainingPoints <= 0) throw tooMany(res)
}

/** Spends one attempt (a failure); throws 429 when that was the last one. */
export async function spendAttempt(name: LimitName, key: string): Promise<void> {
  const cfg = LIMITS[name]
  try {
    await limiter(name, cfg.points, cfg.duration, cfg.block).consume(key)
  } catch (e) {
    if (e instanceof RateLimiterRes) throw tooMany(e)
    throw e
  }
}

export async function clearAttempts(name: LimitName, key: string): Promise<void> {
  const cfg = LIMITS[name]
  await limiter(name, cfg.points, cfg.duration, cfg.block).delete(key)
}
