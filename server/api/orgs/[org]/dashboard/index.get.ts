import { dashboardQuerySchema } from '#shared/schemas/dashboard'
import { dashboardFigures } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  const q = queryOf(event, dashboardQuerySchema)
  // Reused until the organisation's data changes or the quarter-hour turns (every time zone's date changes on one).
  return reuseAnswer(event, ctx, `dashboard-index ${quarterHour()} ${JSON.stringify(q)}`, () => dashboardFigures(ctx, q))
})
