import { programmeGroupQuerySchema } from '#shared/schemas/programme'
import { programmeByRoute } from '~~/server/services/programme'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return programmeByRoute(ctx, queryOf(event, programmeGroupQuerySchema))
})
