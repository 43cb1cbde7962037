import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { listAttachments } from '~~/server/services/attachments'
import { findingReadCheck, findingSubject } from '~~/server/services/finding-attachments'

// A finding's stored images with short-lived thumbnail and full-size links.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return listAttachments(ctx, findingSubject(id), { check: findingReadCheck(ctx, id) })
})
