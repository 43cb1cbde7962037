import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getAsset } from '~~/server/services/register-assets'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getAsset(ctx, id)
})
