import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { assetUpdateSchema } from '#shared/schemas/register'
import { updateAsset } from '~~/server/services/register-assets'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const input = await bodyOf(event, assetUpdateSchema)
  return updateAsset(ctx, id, input)
})
