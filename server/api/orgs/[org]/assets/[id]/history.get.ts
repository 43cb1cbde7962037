import { assetHistoryQuerySchema } from '#shared/schemas/finding'
import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { assetHistory } from '~~/server/services/findings'

// Every check and finding of one asset, newest first, a page at a time.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return assetHistory(ctx, id, queryOf(event, assetHistoryQuerySchema))
})
