import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getReport } from '~~/server/services/survey-reports'

// One report with its state and progress (the page polls this while the report is made).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'reports.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return getReport(ctx, id)
})
