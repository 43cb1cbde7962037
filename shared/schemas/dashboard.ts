import { z } from 'zod'
import { isoDateSchema, pageSchema, pageSizeSchema } from './common'

/** Site ids from the query string: `site=a&site=b` or `site=a,b`; at most 200. */
const siteIdsSchema = z
  .union([z.string(), z.array(z.string())])
  .optional()
  .transform((v) => (v === undefined ? [] : (Array.isArray(v) ? v : [v]).flatMap((s) => s.split(',')).map((s) => s.trim()).filter(Boolean)))
  .pipe(z.array(z.uuid('Not a site.')).max(200, 'Choose at most 200 sites.'))

/** The dashboard's filters: a period of whole days (both ends included) and optional sites. */
export const dashboardQuerySchema = z.object({
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  site: siteIdsSchema,
}).refine((q) => !q.from || !q.to || q.from <= q.to, { message: 'The period must end on or after its start.', path: ['to'] })
  .refine((q) => !q.from || !q.to || Date.parse(q.to) - Date.parse(q.from) <= 10 * 366 * 86_400_000, { message: 'Choose a period of at most ten years.', path: ['to'] })

export const COVERAGE_STATUSES = ['on_time', 'late', 'missed'] as const

/** The list behind the coverage figure: the assets due in the period, with how their check went. */
export const dashboardCoverageQuerySchema = z.object({
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  site: siteIdsSchema,
  status: z.enum([...COVERAGE_STATUSES, 'all']).default('all'),
  page: pageSchema,
  pageSize: pageSizeSchema,
})

/** The list behind the repeat-finding figure: components found again in the period. */
export const dashboardRepeatQuerySchema = z.object({
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  site: siteIdsSchema,
  page: pageSchema,
  pageSize: pageSizeSchema,
})

/** The list behind the repair and verification figures: re-scans recorded in the period. */
export const dashboardVerificationQuerySchema = z.object({
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  site: siteIdsSchema,
  result: z.enum(['passed', 'failed', 'all']).default('all'),
  band: z.coerce.number().int().min(1, 'Bands are 1 to 4.').max(4, 'Bands are 1 to 4.').optional(),
  /** Only the first passed re-scan of each finding (the repairs the median counts). */
  firstPass: z.enum(['true', 'false']).optional(),
  page: pageSchema,
  pageSize: pageSizeSchema,
})
