import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { importSummary } from '~~/server/services/register-import'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return importSummary(ctx, id)
})
