import { assetListQuerySchema } from '#shared/schemas/register'
import { listAssets } from '~~/server/services/register-assets'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return listAssets(ctx, queryOf(event, assetListQuerySchema))
})
