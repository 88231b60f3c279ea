import { createError } from 'h3'

/** Turns a domain error carrying a statusCode into an HTTP error; anything else is rethrown. */
export function asHttpError(e: unknown): never {
  if (e instanceof Error && 'statusCode' in e && typeof e.statusCode === 'number') {
    throw createError({ statusCode: e.statusCode, message: e.message })
  }
  throw e
}
