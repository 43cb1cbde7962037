import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { removeMember } from '~~/server/services/members'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  await removeMember(ctx, id)
  setResponseStatus(event, 204)
  return null
})
