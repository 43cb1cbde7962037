import { memberRoleUpdateSchema, orgIdParamsSchema } from '#shared/schemas/organisation'
import { changeRole } from '~~/server/services/members'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { role } = await bodyOf(event, memberRoleUpdateSchema)
  return changeRole(ctx, id, role)
})
