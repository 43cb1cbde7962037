import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getRoute } from '~~/server/services/routes'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getRoute(ctx, id)
})
