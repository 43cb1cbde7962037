import { workOrderPeople } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  return workOrderPeople(ctx)
})
