import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { archiveSchema } from '#shared/schemas/register'
import { setAssetArchived } from '~~/server/services/register-assets'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { version } = await bodyOf(event, archiveSchema)
  return setAssetArchived(ctx, id, version, true)
})
