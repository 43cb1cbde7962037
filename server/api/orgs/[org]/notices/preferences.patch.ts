import { noticePreferencesSchema } from '#shared/schemas/notices'
import { saveNoticePreferences } from '~~/server/services/notices'

// Choosing fewer e-mails must stay possible while the organisation is read-only.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'notices.view', allowWhenReadOnly: true })
  return saveNoticePreferences(ctx, await bodyOf(event, noticePreferencesSchema))
})
