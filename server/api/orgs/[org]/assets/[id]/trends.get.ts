import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { trendQuerySchema } from '#shared/schemas/trends'
import { assetTrends } from '~~/server/services/trends'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return assetTrends(ctx, id, queryOf(event, trendQuerySchema))
})
