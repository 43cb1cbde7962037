import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { revokeInvitation } from '~~/server/services/invitations'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return revokeInvitation(ctx, id)
})
