import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getInstrument } from '~~/server/services/instruments'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getInstrument(ctx, id)
})
