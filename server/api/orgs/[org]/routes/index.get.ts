import { routeListQuerySchema } from '#shared/schemas/route'
import { listRoutes } from '~~/server/services/routes'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return listRoutes(ctx, queryOf(event, routeListQuerySchema))
})
