import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { listReports } from '~~/server/services/survey-reports'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'reports.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return listReports(ctx, id)
})
