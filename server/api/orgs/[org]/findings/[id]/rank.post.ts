import { findingRankSchema } from '#shared/schemas/finding'
import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { assertFindingExists, rankFinding } from '~~/server/services/findings'

// A manager's corrected band for one finding, with the written reason.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'findings.review' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertFindingExists(ctx, id)
  return rankFinding(ctx, id, await bodyOf(event, findingRankSchema))
})
