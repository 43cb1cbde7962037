import { outboxListQuerySchema } from '#shared/schemas/notices'
import { listOutbox } from '~~/server/services/notices'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'notices.outbox' })
  return listOutbox(ctx, queryOf(event, outboxListQuerySchema))
})
