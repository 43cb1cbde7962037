import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getWorkOrder(ctx, id)
})
