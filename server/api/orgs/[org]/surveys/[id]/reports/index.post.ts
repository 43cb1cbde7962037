import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { reportRequestSchema } from '#shared/schemas/report'
import { requestReport } from '~~/server/services/survey-reports'

// Queues a PDF report of a reviewed survey; answers 202 at once, the page polls GET /reports/:id for progress.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'reports.create' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const report = await requestReport(ctx, id, await bodyOf(event, reportRequestSchema))
  setResponseStatus(event, 202)
  return report
})
