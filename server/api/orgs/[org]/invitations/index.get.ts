import { toInvitationView } from '~~/server/services/invitations'

// Pending invitations (newest first); accepted and withdrawn ones stay in the table for the record.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const rows = await useDb().selectFrom('invitations')
    .select(['id', 'email', 'role', 'status', 'expires_at', 'sent_count', 'last_sent_at', 'created_at'])
    .where('organisation_id', '=', ctx.org.id)
    .where('status', '=', 'pending')
    .orderBy('created_at', 'desc')
    .execute()
  return rows.map(toInvitationView)
})
