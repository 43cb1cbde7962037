import { attachmentFileQuerySchema, attachmentParamsSchema } from '#shared/schemas/attachment'
import { attachmentFileUrl } from '~~/server/services/attachments'
import { workOrderReadCheck, workOrderSubject } from '~~/server/services/work-order-attachments'

// Opens a stored repair photo: redirects to a presigned GET valid for a minute; a client asking for JSON gets the link.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'workorders.view' })
  const { id, attachmentId } = paramsOf(event, attachmentParamsSchema)
  const { variant } = queryOf(event, attachmentFileQuerySchema)
  const url = await attachmentFileUrl(ctx, workOrderSubject(id), attachmentId, variant, { check: workOrderReadCheck(ctx, id) })
  setResponseHeader(event, 'cache-control', 'private, no-store')
  const accept = getRequestHeader(event, 'accept') ?? ''
  if (accept.includes('application/json') && !accept.includes('text/html')) return { url }
  return sendRedirect(event, url, 302)
})
