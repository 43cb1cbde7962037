import { listApiTokens } from '~~/server/services/api-tokens'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'tokens.manage' })
  return listApiTokens(ctx)
})
