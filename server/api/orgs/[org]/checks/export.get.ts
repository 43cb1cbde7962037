import { checkListQuerySchema } from '#shared/schemas/checks'
import { exportChecks } from '~~/server/services/exports'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const q = queryOf(event, checkListQuerySchema)
  setResponseHeaders(event, {
    'content-type': 'text/csv; charset=utf-8',
    'content-disposition': `attachment; filename="${ctx.org.slug}-checks-${new Date().toISOString().slice(0, 10)}.csv"`,
    'cache-control': 'no-store',
  })
  return sendStream(event, exportChecks(ctx, q))
})
