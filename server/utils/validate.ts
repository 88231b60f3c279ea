import type { H3Event } from 'h3'
import { createError, getQuery, getRouterParam, readBody } from 'h3'
import type { z } from 'zod'

export interface FieldIssue {
  path: string
  message: string
}

/** zod issues → the stable `issues` list of our error body. */
export function toFieldIssues(error: z.ZodError): FieldIssue[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }))
}

export function validationError(issues: FieldIssue[], message = 'Some fields need attention') {
  return createError({ statusCode: 400, message, data: { issues } })
}

function parseWith<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
  const r = schema.safeParse(value)
  if (!r.success) throw validationError(toFieldIssues(r.error))
  return r.data
}

export async function parseBody<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  let body: unknown
  try {
    body = await readBody(event)
  } catch {
    throw createError({ statusCode: 400, message: 'The request body is not valid JSON' })
  }
  return parseWith(schema, body ?? {})
}

export function parseQuery<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  return parseWith(schema, getQuery(event))
}

/** A positive integer route parameter, else 400. */
export function idParam(event: H3Event, name = 'id'): number {
  const raw = getRouterParam(event, name)
  const n = Number(raw)
  if (!raw || !Number.isSafeInteger(n) || n <= 0) {
    throw validationError([{ path: name, message: 'must be a positive whole number' }], `Invalid ${name}`)
  }
  return n
}
