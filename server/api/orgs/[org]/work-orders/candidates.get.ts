import { workOrderCandidatesQuerySchema } from '#shared/schemas/work-order'
import { raiseCandidates } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.raise' })
  const { siteId } = queryOf(event, workOrderCandidatesQuerySchema)
  return raiseCandidates(ctx, siteId)
})
