import { checkListQuerySchema } from '#shared/schemas/checks'
import { listChecks } from '~~/server/services/checks'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  return listChecks(ctx, queryOf(event, checkListQuerySchema))
})
