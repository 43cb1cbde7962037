import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { instrumentUpdateSchema } from '#shared/schemas/instrument'
import { updateInstrument } from '~~/server/services/instruments'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return updateInstrument(ctx, id, await bodyOf(event, instrumentUpdateSchema))
})
