import { attachmentBatchQuerySchema } from '#shared/schemas/attachment'
import { listAttachmentsFor } from '~~/server/services/attachments'

// Stored images of several findings at once (?ids=a,b,c), for lists that show thumbnails. Ids of findings that are
// not this organisation's find nothing, as every query carries the organisation condition.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { ids } = queryOf(event, attachmentBatchQuerySchema)
  return listAttachmentsFor(ctx, 'finding', ids)
})
