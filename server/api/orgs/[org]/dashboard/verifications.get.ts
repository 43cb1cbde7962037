import { dashboardVerificationQuerySchema } from '#shared/schemas/dashboard'
import { verificationList } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  return verificationList(ctx, queryOf(event, dashboardVerificationQuerySchema))
})
