import { z } from 'zod'
import { archivedFilterSchema, boundedNumber, notesSchema, pageSchema, pageSizeSchema, searchSchema, versionSchema } from './common'

/** Most stops a route may hold: a day's or a week's trip, well inside the planner's limits. */
export const MAX_ROUTE_STOPS = 200

const routeFields = z.object({
  name: z.string({ error: 'Name the route.' }).trim().min(2, 'Name the route.').max(120, 'Use at most 120 characters.'),
  baseName: z.string({ error: 'Name the base.' }).trim().min(1, 'Name the base the crew starts from.').max(120, 'Use at most 120 characters.'),
  baseLatitude: boundedNumber(-90, 90, '°'),
  baseLongitude: boundedNumber(-180, 180, '°'),
  recurrenceMonths: z.number({ error: 'Enter a number of months.' }).int('Use whole months.').min(1, 'Use 1 to 60 months.').max(60, 'Use 1 to 60 months.'),
  thermographerId: z.uuid('Choose a thermographer.').nullable().optional(),
  instrumentId: z.uuid('Choose an instrument.').nullable().optional(),
  notes: notesSchema.optional(),
  /** Sites in visiting order. */
  siteIds: z.array(z.uuid('Not a site.')).max(MAX_ROUTE_STOPS, `A route holds at most ${MAX_ROUTE_STOPS} sites.`)
    .refine((ids) => new Set(ids).size === ids.length, 'A site appears only once in a route.')
    .optional(),
})

export const routeCreateSchema = routeFields
export type RouteCreateInput = z.input<typeof routeCreateSchema>
export const routeUpdateSchema = routeFields.partial().extend({ version: versionSchema })
export type RouteUpdateInput = z.input<typeof routeUpdateSchema>

export const routeListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  q: searchSchema,
  status: archivedFilterSchema,
  sort: z.enum(['name', 'stops', 'updated']).default('name'),
})

export const routeVersionSchema = z.object({ version: versionSchema })
