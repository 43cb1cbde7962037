import { z } from 'zod'
import { pageSchema, pageSizeSchema, searchSchema } from './common'

/** Look-ahead window in days: 30, 60 or 90. */
export const windowSchema = z.enum(['30', '60', '90'], { error: 'Choose 30, 60 or 90 days.' }).transform((v) => Number(v) as 30 | 60 | 90).default(90)

export const programmeGroupQuerySchema = z.object({
  window: windowSchema,
  page: pageSchema,
  pageSize: pageSizeSchema,
  q: searchSchema,
  /** 'due' lists only groups with something overdue or due in the window. */
  show: z.enum(['due', 'all']).default('due'),
  sort: z.enum(['soonest', 'overdue', 'name']).default('soonest'),
})

export const programmeAssetQuerySchema = z.object({
  window: windowSchema,
  page: pageSchema,
  pageSize: pageSizeSchema,
  q: searchSchema,
  siteId: z.uuid().optional(),
  routeId: z.uuid().optional(),
  status: z.enum(['overdue', 'due', 'all']).default('all'),
})
