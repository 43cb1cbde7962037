import { dashboardQuerySchema } from '#shared/schemas/dashboard'
import { dashboardFigures } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  return dashboardFigures(ctx, queryOf(event, dashboardQuerySchema))
})
