import { attachmentFileQuerySchema, attachmentParamsSchema } from '#shared/schemas/attachment'
import { attachmentFileUrl } from '~~/server/services/attachments'
import { findingReadCheck, findingSubject } from '~~/server/services/finding-attachments'

// Opens a stored image: redirects a browser to a presigned GET valid for a minute (?variant=thumbnail for the small one).
// A client asking for JSON gets the link instead of the redirect.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id, attachmentId } = paramsOf(event, attachmentParamsSchema)
  const { variant } = queryOf(event, attachmentFileQuerySchema)
  const url = await attachmentFileUrl(ctx, findingSubject(id), attachmentId, variant, { check: findingReadCheck(ctx, id) })
  setResponseHeader(event, 'cache-control', 'private, no-store')
  const accept = getRequestHeader(event, 'accept') ?? ''
  if (accept.includes('application/json') && !accept.includes('text/html')) return { url }
  return sendRedirect(event, url, 302)
})
