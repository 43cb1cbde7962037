import { attachmentParamsSchema } from '#shared/schemas/attachment'
import { completeAttachmentUpload } from '~~/server/services/attachments'
import { findingSubject, findingWriteOptions } from '~~/server/services/finding-attachments'

// After the browser's PUT: checks the stored bytes (size, type by content), makes the thumbnail, marks the image stored.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id, attachmentId } = paramsOf(event, attachmentParamsSchema)
  return completeAttachmentUpload(ctx, findingSubject(id), attachmentId, findingWriteOptions(ctx, id))
})
