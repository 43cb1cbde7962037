import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { reportDownload } from '~~/server/services/survey-reports'

// A browser following the link is redirected to a short-lived object-storage URL; a JSON client gets the URL.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'reports.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const link = await reportDownload(ctx, id)
  if ((getRequestHeader(event, 'accept') ?? '').includes('application/json')) return link
  return sendRedirect(event, link.url, 302)
})
