import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { listAttachments } from '~~/server/services/attachments'
import { workOrderReadCheck, workOrderSubject } from '~~/server/services/work-order-attachments'

// A work order's stored repair photos with short-lived thumbnail and full-size links.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return listAttachments(ctx, workOrderSubject(id), { check: workOrderReadCheck(ctx, id) })
})
