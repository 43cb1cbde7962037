import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getGrid } from '~~/server/services/temperature-grids'

// A temperature grid's shape, range, marked regions and the survey instrument's band.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getGrid(ctx, id)
})
