import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { surveyConditionsSchema } from '#shared/schemas/survey'
import { assertSurveyExists, recordConditions } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  return recordConditions(ctx, id, await bodyOf(event, surveyConditionsSchema))
})
