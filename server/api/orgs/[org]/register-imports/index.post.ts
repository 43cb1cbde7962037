import { importCreateSchema } from '#shared/schemas/register'
import { createImport } from '~~/server/services/register-import'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.edit' })
  const input = await bodyOf(event, importCreateSchema)
  const summary = await createImport(ctx, input)
  setResponseStatus(event, 201)
  return summary
})
