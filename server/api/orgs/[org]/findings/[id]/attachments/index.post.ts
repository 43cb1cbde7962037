import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { attachmentBeginSchema } from '#shared/schemas/attachment'
import { beginAttachmentUpload } from '~~/server/services/attachments'
import { assertFindingExists, findingSubject, findingWriteOptions } from '~~/server/services/finding-attachments'

// Starts an image upload on a finding: records it as pending and answers a presigned PUT URL for the bytes.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.run' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await assertFindingExists(ctx, id)
  const input = await bodyOf(event, attachmentBeginSchema)
  const ticket = await beginAttachmentUpload(ctx, findingSubject(id), input, findingWriteOptions(ctx, id))
  setResponseStatus(event, 201)
  return ticket
})
