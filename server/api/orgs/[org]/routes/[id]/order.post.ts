import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { routeVersionSchema } from '#shared/schemas/route'
import { orderRoute } from '~~/server/services/routes'

// "Order for shortest trip": the tour planner reorders the saved stops from the route's base.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'routes.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { version } = await bodyOf(event, routeVersionSchema)
  return orderRoute(ctx, id, version)
})
