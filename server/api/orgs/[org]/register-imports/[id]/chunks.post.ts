import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { importChunkSchema } from '#shared/schemas/register'
import { receiveChunk } from '~~/server/services/register-import'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { seq, text } = await bodyOf(event, importChunkSchema)
  return receiveChunk(ctx, id, seq, text)
})
