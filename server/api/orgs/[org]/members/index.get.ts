import { listMembers } from '~~/server/services/members'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.view' })
  return listMembers(ctx)
})
