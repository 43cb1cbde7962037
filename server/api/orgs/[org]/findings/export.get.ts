import { findingListQuerySchema } from '#shared/schemas/survey'
import { exportFindings } from '~~/server/services/exports'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const q = queryOf(event, findingListQuerySchema)
  setResponseHeaders(event, {
    'content-type': 'text/csv; charset=utf-8',
    'content-disposition': `attachment; filename="${ctx.org.slug}-findings-${new Date().toISOString().slice(0, 10)}.csv"`,
    'cache-control': 'no-store',
  })
  return sendStream(event, exportFindings(ctx, q))
})
