import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { surveyReviewSchema } from '#shared/schemas/survey'
import { assertSurveyExists, reviewSurvey } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'findings.review' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  return reviewSurvey(ctx, id, await bodyOf(event, surveyReviewSchema))
})
