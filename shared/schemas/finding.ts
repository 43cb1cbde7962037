import { z } from 'zod'
import { pageSchema, pageSizeSchema, versionSchema } from './common'

// A manager's correction of a finding's band, the thermographer's edit of a saved finding, and an asset's history.

/** Shortest written reason accepted for a corrected band: a few words, not a shrug. */
export const REVIEW_REASON_MIN = 10

export const findingRankSchema = z.object({
  band: z.coerce.number({ error: 'Choose band 1 to 4.' }).int('Choose band 1 to 4.').min(1, 'Choose band 1 to 4.').max(4, 'Choose band 1 to 4.'),
  reason: z.string({ error: 'Say why the band is corrected.' }).trim()
    .min(REVIEW_REASON_MIN, `Say why the band is corrected, in at least ${REVIEW_REASON_MIN} characters.`)
    .max(2000, 'Use at most 2000 characters.'),
  version: versionSchema,
})
export type FindingRankInput = z.input<typeof findingRankSchema>

/** The version a saved finding was loaded with, sent beside its edited fields. */
export const findingVersionSchema = z.object({ version: versionSchema })

export const assetHistoryQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
})
