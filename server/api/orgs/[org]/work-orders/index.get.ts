import { workOrderListQuerySchema } from '#shared/schemas/work-order'
import { listWorkOrders } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  return listWorkOrders(ctx, queryOf(event, workOrderListQuerySchema))
})
