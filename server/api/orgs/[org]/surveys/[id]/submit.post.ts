import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { surveyVersionSchema } from '#shared/schemas/survey'
import { assertSurveyExists, submitSurvey } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  const { version } = await bodyOf(event, surveyVersionSchema)
  return submitSurvey(ctx, id, version)
})
