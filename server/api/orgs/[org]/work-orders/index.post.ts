import { workOrderRaiseSchema } from '#shared/schemas/work-order'
import { raiseWorkOrder } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.raise' })
  const input = await bodyOf(event, workOrderRaiseSchema)
  const wo = await raiseWorkOrder(ctx, input)
  setResponseStatus(event, 201)
  return wo
})
