import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { routeVersionSchema } from '#shared/schemas/route'
import { setRouteArchived } from '~~/server/services/routes'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'routes.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { version } = await bodyOf(event, routeVersionSchema)
  return setRouteArchived(ctx, id, version, true)
})
