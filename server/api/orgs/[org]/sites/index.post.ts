import { siteCreateSchema } from '#shared/schemas/register'
import { createSite } from '~~/server/services/register-sites'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const input = await bodyOf(event, siteCreateSchema)
  const site = await createSite(ctx, input)
  setResponseStatus(event, 201)
  return site
})
