import { siteListQuerySchema } from '#shared/schemas/register'
import { listSites } from '~~/server/services/register-sites'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return listSites(ctx, queryOf(event, siteListQuerySchema))
})
