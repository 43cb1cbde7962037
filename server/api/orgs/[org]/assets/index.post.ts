import { assetCreateSchema } from '#shared/schemas/register'
import { createAsset } from '~~/server/services/register-assets'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const input = await bodyOf(event, assetCreateSchema)
  const asset = await createAsset(ctx, input)
  setResponseStatus(event, 201)
  return asset
})
