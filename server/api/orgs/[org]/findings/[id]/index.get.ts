import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getFinding } from '~~/server/services/finding-read'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getFinding(ctx, id)
})
