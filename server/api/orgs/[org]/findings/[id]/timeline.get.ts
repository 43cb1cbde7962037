import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { findingTimeline } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return findingTimeline(ctx, id)
})
