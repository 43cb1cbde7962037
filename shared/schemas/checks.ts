import { z } from 'zod'
import { CHECK_OUTCOMES } from './survey'
import { isoDateSchema, pageSchema, pageSizeSchema } from './common'

/** The checks list (and its CSV export): filtered by survey, asset, outcome and survey date, paginated. */
export const checkListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  surveyId: z.uuid('Not a survey.').optional(),
  assetId: z.uuid('Not an asset.').optional(),
  outcome: z.enum(CHECK_OUTCOMES, { error: 'Choose clear, finding or not_reached.' }).optional(),
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
})
export type CheckListQuery = z.input<typeof checkListQuerySchema>
