import { repairDeadlinesUpdateSchema } from '#shared/schemas/work-order'
import { updateRepairDeadlines } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.manage' })
  return updateRepairDeadlines(ctx, await bodyOf(event, repairDeadlinesUpdateSchema))
})
