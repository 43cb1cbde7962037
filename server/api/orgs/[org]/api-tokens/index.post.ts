import { apiTokenCreateSchema } from '#shared/api-tokens'
import { createApiToken } from '~~/server/services/api-tokens'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'tokens.manage' })
  const input = await bodyOf(event, apiTokenCreateSchema)
  setResponseStatus(event, 201)
  // The secret is in this answer only: never cache it.
  setResponseHeader(event, 'cache-control', 'no-store')
  return createApiToken(ctx, input)
})
