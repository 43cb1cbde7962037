import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { findingSchema } from '#shared/schemas/survey'
import { assertSurveyExists, recordFinding } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  const input = await bodyOf(event, findingSchema)
  // Sent again from the offline queue with the same key: the first finding comes back, no second copy is made.
  return withIdempotency(event, ctx, async () => {
    const finding = await recordFinding(ctx, id, input)
    setResponseStatus(event, 201)
    return finding
  })
})
