import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { checkSchema } from '#shared/schemas/survey'
import { assertSurveyExists, recordCheck } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  return recordCheck(ctx, id, await bodyOf(event, checkSchema))
})
