import { attachmentParamsSchema } from '#shared/schemas/attachment'
import { archiveAttachment } from '~~/server/services/attachments'
import { findingSubject, findingWriteOptions } from '~~/server/services/finding-attachments'

// Takes a wrong image off a finding while the survey is being recorded; the record is archived, never deleted.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id, attachmentId } = paramsOf(event, attachmentParamsSchema)
  await archiveAttachment(ctx, findingSubject(id), attachmentId, findingWriteOptions(ctx, id))
  setResponseStatus(event, 204)
  return null
})
