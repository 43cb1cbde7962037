import { z } from 'zod'

// Pieces several list and form schemas share (instruments, surfaces, routes, programme).

/** A whole page number from the query string (1 when absent). */
export const pageSchema = z.coerce.number({ error: 'Not a page number.' }).int('Not a page number.').min(1, 'Not a page number.').max(100_000).default(1)
/** Rows per page from the query string. */
export const pageSizeSchema = z.coerce.number({ error: 'Not a page size.' }).int('Not a page size.').min(1, 'Use 1 to 100.').max(100, 'Use 1 to 100.').default(25)
/** A free-text search from the query string. */
export const searchSchema = z.string().trim().max(120, 'Use at most 120 characters.').optional()
/** Which rows a list shows: the active ones (default), the archived ones, or both. */
export const archivedFilterSchema = z.enum(['active', 'archived', 'all']).default('active')

/** A calendar date typed as YYYY-MM-DD, in years a programme can mean (PostgreSQL has no year 0000). */
export const isoDateSchema = z.iso.date({ error: 'Enter a date as YYYY-MM-DD.' })
  .refine((d) => d >= '1900-01-01' && d <= '2999-12-31', 'Enter a date between the years 1900 and 2999.')

// No defaults in form schemas: zod applies them inside .partial() too, which would blank fields a PATCH left out.
/** A free text such as notes, trimmed. */
export const notesSchema = z.string().trim().max(2000, 'Use at most 2000 characters.')

/** The row version the form was loaded with (optimistic locking). */
export const versionSchema = z.number({ error: 'Reload and try again.' }).int().positive().max(2_147_483_647, 'Reload and try again.')

/** A required number within limits, with plain messages. */
export function boundedNumber(min: number, max: number, unit = '') {
  const u = unit ? ` ${unit}` : ''
  return z.number({ error: 'Enter a number.' }).min(min, `Use ${min} to ${max}${u}.`).max(max, `Use ${min} to ${max}${u}.`)
}
