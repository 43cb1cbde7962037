import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { workOrderUpdateSchema } from '#shared/schemas/work-order'
import { assertWorkOrderExists, updateWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.raise' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  return updateWorkOrder(ctx, id, await bodyOf(event, workOrderUpdateSchema))
})
