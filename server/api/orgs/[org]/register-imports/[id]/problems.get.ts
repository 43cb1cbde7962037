import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { importProblemsQuerySchema } from '#shared/schemas/register'
import { importProblems } from '~~/server/services/register-import'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { page, pageSize } = queryOf(event, importProblemsQuerySchema)
  return importProblems(ctx, id, page, pageSize)
})
