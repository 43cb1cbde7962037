import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { commitImport } from '~~/server/services/register-import'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return commitImport(ctx, id)
})
