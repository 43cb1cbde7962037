import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { gridRegionsSchema } from '#shared/schemas/grid'
import { getGrid, saveGridRegions } from '~~/server/services/temperature-grids'

// Saves the hot-spot and reference regions marked on a grid (the survey's assigned thermographer, while recording).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await getGrid(ctx, id)
  const input = await bodyOf(event, gridRegionsSchema)
  return saveGridRegions(ctx, id, input)
})
