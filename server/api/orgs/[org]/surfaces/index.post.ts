import { surfaceCreateSchema } from '#shared/schemas/surface'
import { createSurface } from '~~/server/services/surfaces'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const surface = await createSurface(ctx, await bodyOf(event, surfaceCreateSchema))
  setResponseStatus(event, 201)
  return surface
})
