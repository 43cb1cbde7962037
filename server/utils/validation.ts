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

/** Reads and validates the JSON body; 400 with field paths when it does not match. */
export async function bodyOf<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  const raw = await readBody(event).catch(() => undefined)
  const result = schema.safeParse(raw ?? {})
  if (!result.success) invalid(result.error, 'form')
  return result.data
}

/** Validates the query string. */
export function queryOf<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) invalid(result.error, 'query')
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
