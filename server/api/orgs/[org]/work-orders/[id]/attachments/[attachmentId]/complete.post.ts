import { attachmentParamsSchema } from '#shared/schemas/attachment'
import { completeAttachmentUpload } from '~~/server/services/attachments'
import { workOrderSubject, workOrderWriteOptions } from '~~/server/services/work-order-attachments'
import { recordEvent } from '~~/server/services/record-events'

// After the browser's PUT: checks the stored bytes, makes the thumbnail, marks the photo stored (and notes it on the timeline).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.work' })
  const { id, attachmentId } = paramsOf(event, attachmentParamsSchema)
  const attachment = await completeAttachmentUpload(ctx, workOrderSubject(id), attachmentId, workOrderWriteOptions(ctx, id))
  await recordEvent(useDb(), {
    organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'photo_added',
    details: { attachmentId: attachment.id, fileName: attachment.fileName, kind: attachment.kind },
  })
  return attachment
})
