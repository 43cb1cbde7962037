import { verificationListQuerySchema } from '#shared/schemas/work-order'
import { listVerifications } from '~~/server/services/verifications'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  return listVerifications(ctx, queryOf(event, verificationListQuerySchema))
})
