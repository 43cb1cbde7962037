import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getSurvey } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getSurvey(ctx, id)
})
