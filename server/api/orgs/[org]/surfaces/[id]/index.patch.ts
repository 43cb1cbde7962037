import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { surfaceUpdateSchema } from '#shared/schemas/surface'
import { updateSurface } from '~~/server/services/surfaces'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return updateSurface(ctx, id, await bodyOf(event, surfaceUpdateSchema))
})
