import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { workOrderDeferSchema } from '#shared/schemas/work-order'
import { assertWorkOrderExists, deferWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.work' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  return deferWorkOrder(ctx, id, await bodyOf(event, workOrderDeferSchema))
})
