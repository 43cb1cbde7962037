import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { revokeApiToken } from '~~/server/services/api-tokens'

// Revoking stays possible while the organisation is read-only: cutting off a leaked token must never wait on billing.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'tokens.manage', allowWhenReadOnly: true })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return revokeApiToken(ctx, id)
})
