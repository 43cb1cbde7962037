import { apiTokenRequestsQuerySchema } from '#shared/api-tokens'
import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { listApiTokenRequests } from '~~/server/services/api-tokens'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'tokens.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return listApiTokenRequests(ctx, id, queryOf(event, apiTokenRequestsQuerySchema))
})
