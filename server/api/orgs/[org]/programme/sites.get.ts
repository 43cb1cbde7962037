import { programmeGroupQuerySchema } from '#shared/schemas/programme'
import { programmeBySite } from '~~/server/services/programme'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return programmeBySite(ctx, queryOf(event, programmeGroupQuerySchema))
})
