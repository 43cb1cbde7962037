import { dashboardVerificationQuerySchema } from '#shared/schemas/dashboard'
import { verificationList } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  const q = queryOf(event, dashboardVerificationQuerySchema)
  // Reused until the organisation's data changes or the quarter-hour turns (every time zone's date changes on one).
  return reuseAnswer(event, ctx, `dashboard-verifications ${quarterHour()} ${JSON.stringify(q)}`, () => verificationList(ctx, q))
})
