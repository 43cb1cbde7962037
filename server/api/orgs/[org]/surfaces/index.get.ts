import { surfaceListQuerySchema } from '#shared/schemas/surface'
import { listSurfaces } from '~~/server/services/surfaces'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return listSurfaces(ctx, queryOf(event, surfaceListQuerySchema))
})
