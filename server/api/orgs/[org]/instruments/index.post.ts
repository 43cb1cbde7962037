import { instrumentCreateSchema } from '#shared/schemas/instrument'
import { createInstrument } from '~~/server/services/instruments'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const input = await bodyOf(event, instrumentCreateSchema)
  const instrument = await createInstrument(ctx, input)
  setResponseStatus(event, 201)
  return instrument
})
