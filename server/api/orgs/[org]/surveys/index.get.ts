import { surveyListQuerySchema } from '#shared/schemas/survey'
import { listSurveys } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  return listSurveys(ctx, queryOf(event, surveyListQuerySchema))
})
