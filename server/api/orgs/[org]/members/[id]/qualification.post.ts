import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { memberQualificationSchema } from '#shared/schemas/report'
import { setQualification } from '~~/server/services/member-qualification'

// Records a member's thermography qualification (printed on survey reports); owners keep the member list.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'members.manage' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  return setQualification(ctx, id, (await bodyOf(event, memberQualificationSchema)).qualification)
})
