import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { findingSchema } from '#shared/schemas/survey'
import { assertSurveyExists, recordFinding } from '~~/server/services/surveys'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  const finding = await recordFinding(ctx, id, await bodyOf(event, findingSchema))
  setResponseStatus(event, 201)
  return finding
})
