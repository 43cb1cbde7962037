import { programmeAssetQuerySchema } from '#shared/schemas/programme'
import { programmeAssets } from '~~/server/services/programme'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return programmeAssets(ctx, queryOf(event, programmeAssetQuerySchema))
})
