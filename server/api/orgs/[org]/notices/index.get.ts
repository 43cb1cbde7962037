import { noticeListQuerySchema } from '#shared/schemas/notices'
import { listNotices } from '~~/server/services/notices'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'notices.view' })
  return listNotices(ctx, queryOf(event, noticeListQuerySchema))
})
