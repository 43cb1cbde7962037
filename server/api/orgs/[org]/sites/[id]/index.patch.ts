import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { siteUpdateSchema } from '#shared/schemas/register'
import { updateSite } from '~~/server/services/register-sites'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const input = await bodyOf(event, siteUpdateSchema)
  return updateSite(ctx, id, input)
})
