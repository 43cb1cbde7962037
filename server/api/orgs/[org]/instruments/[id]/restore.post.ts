import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { archiveSchema } from '#shared/schemas/instrument'
import { restoreInstrument } from '~~/server/services/instruments'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { version } = await bodyOf(event, archiveSchema)
  return restoreInstrument(ctx, id, version)
})
