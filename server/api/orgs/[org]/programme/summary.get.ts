import { z } from 'zod'
import { windowSchema } from '#shared/schemas/programme'
import { programmeSummary } from '~~/server/services/programme'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { window } = queryOf(event, z.object({ window: windowSchema }))
  return programmeSummary(ctx, window)
})
