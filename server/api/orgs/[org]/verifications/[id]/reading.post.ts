import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { verificationReadingSchema } from '#shared/schemas/work-order'
import { assertVerificationExists, recordVerification } from '~~/server/services/verifications'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'verifications.record' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertVerificationExists(ctx, id)
  const input = await bodyOf(event, verificationReadingSchema)
  // Sent again from the offline queue with the same key: the first answer comes back, nothing is recorded twice.
  return withIdempotency(event, ctx, () => recordVerification(ctx, id, input))
})
