import { exportQuerySchema } from '#shared/schemas/register'
import { exportSites } from '~~/server/services/register-export'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'register.view' })
  const { show } = queryOf(event, exportQuerySchema)
  setResponseHeaders(event, {
    'content-type': 'text/csv; charset=utf-8',
    'content-disposition': `attachment; filename="${ctx.org.slug}-sites-${new Date().toISOString().slice(0, 10)}.csv"`,
    'cache-control': 'no-store',
  })
  return sendStream(event, exportSites(ctx.org.id, show))
})
