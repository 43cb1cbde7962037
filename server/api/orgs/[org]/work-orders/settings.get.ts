import { repairDeadlinesOf } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  return repairDeadlinesOf(ctx)
})
