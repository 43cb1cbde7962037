import type { H3Event } from 'h3'
import type { z } from 'zod'
import { fieldErrorsFromZod } from '#shared/utils/field-errors'

function invalid(error: z.ZodError, where: string): never {
  throw createError({
    statusCode: 400,
    statusMessage: 'Invalid input',
    data: { message: `Some ${where} values need attention.`, fieldErrors: fieldErrorsFromZod(error) },
  })
}

/** The path of the first text holding a NUL character, which PostgreSQL cannot store (it would answer 500). */
function nulPath(value: unknown, path: string[] = []): string[] | undefined {
  if (typeof value === 'string') return value.includes('\u0000') ? path : undefined
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const found = nulPath(v, [...path, k])
      if (found) return found
    }
  }
  return undefined
}

function refuseNul(value: unknown) {
  const at = nulPath(value)
  if (at) fieldError(at.join('.') || '_', 'Remove the invisible NUL character from this text.')
}

/** Reads and validates the JSON body; 400 with field paths when it does not match. */
export async function bodyOf<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  // Unreadable JSON (or keys that could pollute prototypes) is refused, not taken for an empty form.
  const raw = await readBody(event).catch(() => fieldError('_', 'The request body is not valid JSON.'))
  const result = schema.safeParse(raw ?? {})
  if (!result.success) invalid(result.error, 'form')
  refuseNul(result.data)
  return result.data
}

/** Validates the query string. */
export function queryOf<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) invalid(result.error, 'query')
  refuseNul(result.data)
  return result.data
}

/** Validates the route parameters; a malformed id is a 404, not a 400, to reveal nothing. */
export function paramsOf<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(getRouterParams(event, { decode: true }))
  if (!result.success) throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'Not found.' } })
  return result.data
}

/** A 400 that points at one field, for rules zod cannot see (duplicates, wrong current password…). */
export function fieldError(field: string, message: string, statusCode = 400): never {
  throw createError({ statusCode, statusMessage: 'Invalid input', data: { message, fieldErrors: { [field]: [message] } } })
}
