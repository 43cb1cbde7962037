import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { resendInvitation } from '~~/server/services/invitations'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return resendInvitation(ctx, id)
})
