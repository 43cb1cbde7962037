import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { workOrderWorkSchema } from '#shared/schemas/work-order'
import { assertWorkOrderExists, recordWork } from '~~/server/services/work-orders'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.work' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  return recordWork(ctx, id, await bodyOf(event, workOrderWorkSchema))
})
