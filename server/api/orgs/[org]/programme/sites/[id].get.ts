import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { siteSummary } from '~~/server/services/programme'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return siteSummary(ctx, id)
})
