import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { attachmentBeginSchema } from '#shared/schemas/attachment'
import { beginAttachmentUpload } from '~~/server/services/attachments'
import { workOrderSubject, workOrderWriteOptions } from '~~/server/services/work-order-attachments'
import { assertWorkOrderExists } from '~~/server/services/work-orders'

// Starts a repair photo upload on a work order: records it as pending and answers a presigned PUT URL for the bytes.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.work' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertWorkOrderExists(ctx, id)
  const input = await bodyOf(event, attachmentBeginSchema)
  const ticket = await beginAttachmentUpload(ctx, workOrderSubject(id), input, workOrderWriteOptions(ctx, id))
  setResponseStatus(event, 201)
  return ticket
})
