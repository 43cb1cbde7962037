import { routeCreateSchema } from '#shared/schemas/route'
import { createRoute } from '~~/server/services/routes'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'routes.edit' })
  const route = await createRoute(ctx, await bodyOf(event, routeCreateSchema))
  setResponseStatus(event, 201)
  return route
})
