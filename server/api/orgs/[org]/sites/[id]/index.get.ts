import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getSite } from '~~/server/services/register-sites'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getSite(ctx, id)
})
