import { noticeReadSchema } from '#shared/schemas/notices'
import { markNoticesRead } from '~~/server/services/notices'

// Reading a notice is not a change to the organisation's data: allowed while the organisation is read-only.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'notices.view', allowWhenReadOnly: true })
  return markNoticesRead(ctx, await bodyOf(event, noticeReadSchema))
})
