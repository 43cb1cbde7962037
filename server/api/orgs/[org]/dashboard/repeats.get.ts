import { dashboardRepeatQuerySchema } from '#shared/schemas/dashboard'
import { repeatComponents } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  const q = queryOf(event, dashboardRepeatQuerySchema)
  // Reused until the organisation's data changes or the quarter-hour turns (every time zone's date changes on one).
  return reuseAnswer(event, ctx, `dashboard-repeats ${quarterHour()} ${JSON.stringify(q)}`, () => repeatComponents(ctx, q))
})
