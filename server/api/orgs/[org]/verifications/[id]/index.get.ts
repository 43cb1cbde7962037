import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getVerification } from '~~/server/services/verifications'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getVerification(ctx, id)
})
