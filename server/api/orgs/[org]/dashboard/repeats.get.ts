import { dashboardRepeatQuerySchema } from '#shared/schemas/dashboard'
import { repeatComponents } from '~~/server/services/dashboard'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'dashboard.view' })
  return repeatComponents(ctx, queryOf(event, dashboardRepeatQuerySchema))
})
