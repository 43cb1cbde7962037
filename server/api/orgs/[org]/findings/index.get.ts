import { findingListQuerySchema } from '#shared/schemas/survey'
import { listFindings } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  return listFindings(ctx, queryOf(event, findingListQuerySchema))
})
