import { surveyPlanSchema } from '#shared/schemas/survey'
import { planSurvey } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.plan' })
  const survey = await planSurvey(ctx, await bodyOf(event, surveyPlanSchema))
  setResponseStatus(event, 201)
  return survey
})
