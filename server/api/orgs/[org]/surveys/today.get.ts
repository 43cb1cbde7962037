import { surveyTodayQuerySchema } from '#shared/schemas/survey'
import { todaysSurvey } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  return todaysSurvey(ctx, queryOf(event, surveyTodayQuerySchema).date)
})
