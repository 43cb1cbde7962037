import { instrumentListQuerySchema } from '#shared/schemas/instrument'
import { listInstruments } from '~~/server/services/instruments'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  return listInstruments(ctx, queryOf(event, instrumentListQuerySchema))
})
