import { findingListQuerySchema } from '#shared/schemas/survey'
import { listFindings } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const q = queryOf(event, findingListQuerySchema)
  // The same page for every member who may see it: reused until the organisation's data changes (org-cache.ts).
  return reuseAnswer(event, ctx, `findings ${JSON.stringify(q)}`, () => listFindings(ctx, q))
})
