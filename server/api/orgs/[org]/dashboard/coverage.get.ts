import { dashboardCoverageQuerySchema } from '#shared/schemas/dashboard'
import { coverageAssets } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  const q = queryOf(event, dashboardCoverageQuerySchema)
  // Reused until the organisation's data changes or the quarter-hour turns (every time zone's date changes on one).
  return reuseAnswer(event, ctx, `dashboard-coverage ${quarterHour()} ${JSON.stringify(q)}`, () => coverageAssets(ctx, q))
})
