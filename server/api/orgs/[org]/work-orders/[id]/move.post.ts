import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { workOrderMoveSchema } from '#shared/schemas/work-order'
import { assertWorkOrderExists, moveWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.work' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  return moveWorkOrder(ctx, id, await bodyOf(event, workOrderMoveSchema))
})
