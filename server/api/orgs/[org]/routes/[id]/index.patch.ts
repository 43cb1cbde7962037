import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { routeUpdateSchema } from '#shared/schemas/route'
import { updateRoute } from '~~/server/services/routes'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'routes.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return updateRoute(ctx, id, await bodyOf(event, routeUpdateSchema))
})
