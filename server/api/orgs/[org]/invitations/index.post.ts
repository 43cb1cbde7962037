import { invitationCreateSchema } from '#shared/schemas/organisation'
import { createInvitation } from '~~/server/services/invitations'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { email, role } = await bodyOf(event, invitationCreateSchema)
  const invitation = await createInvitation(ctx, email, role)
  setResponseStatus(event, 201)
  return invitation
})
