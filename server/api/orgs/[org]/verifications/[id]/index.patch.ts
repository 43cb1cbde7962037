import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { verificationAssignSchema } from '#shared/schemas/work-order'
import { assertVerificationExists, assignVerification } from '~~/server/services/verifications'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.raise' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertVerificationExists(ctx, id)
  return assignVerification(ctx, id, await bodyOf(event, verificationAssignSchema))
})
