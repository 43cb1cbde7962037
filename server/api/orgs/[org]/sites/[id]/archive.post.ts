import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { archiveSchema } from '#shared/schemas/register'
import { setSiteArchived } from '~~/server/services/register-sites'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { version } = await bodyOf(event, archiveSchema)
  return setSiteArchived(ctx, id, version, true)
})
