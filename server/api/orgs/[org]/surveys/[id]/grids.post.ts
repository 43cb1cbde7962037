import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { gridUploadSchema } from '#shared/schemas/grid'
import { assertSurveyExists } from '~~/server/services/surveys'
import { uploadGrid } from '~~/server/services/temperature-grids'

// Attaches a CSV temperature grid to an asset of the survey; the text is parsed and checked here with the shared reader.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertSurveyExists(ctx, id)
  const input = await bodyOf(event, gridUploadSchema)
  const grid = await uploadGrid(ctx, id, input)
  setResponseStatus(event, 201)
  return grid
})
