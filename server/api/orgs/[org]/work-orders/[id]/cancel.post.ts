import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { workOrderCancelSchema } from '#shared/schemas/work-order'
import { assertWorkOrderExists, cancelWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.cancel' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  return cancelWorkOrder(ctx, id, await bodyOf(event, workOrderCancelSchema))
})
