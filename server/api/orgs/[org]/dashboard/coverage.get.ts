import { dashboardCoverageQuerySchema } from '#shared/schemas/dashboard'
import { coverageAssets } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  return coverageAssets(ctx, queryOf(event, dashboardCoverageQuerySchema))
})
