import { workOrderListQuerySchema } from '#shared/schemas/work-order'
import { exportWorkOrders } from '~~/server/services/exports'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  const q = queryOf(event, workOrderListQuerySchema)
  setResponseHeaders(event, {
    'content-type': 'text/csv; charset=utf-8',
    'content-disposition': `attachment; filename="${ctx.org.slug}-work-orders-${new Date().toISOString().slice(0, 10)}.csv"`,
    'cache-control': 'no-store',
  })
  return sendStream(event, exportWorkOrders(ctx, q))
})
