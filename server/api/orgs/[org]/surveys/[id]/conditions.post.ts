import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { surveyConditionsSchema } from '#shared/schemas/survey'
import { assertSurveyExists, recordConditions } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  const input = await bodyOf(event, surveyConditionsSchema)
  // Sent again from the offline queue with the same key: answered once, written once.
  return withIdempotency(event, ctx, () => recordConditions(ctx, id, input))
})
