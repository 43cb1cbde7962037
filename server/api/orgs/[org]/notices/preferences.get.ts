import { noticePreferences } from '~~/server/services/notices'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'notices.view' })
  return noticePreferences(useDb(), ctx.org.id, ctx.user.id)
})
