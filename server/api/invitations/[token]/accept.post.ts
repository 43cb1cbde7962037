import { invitationTokenParamsSchema } from '#shared/schemas/organisation'
import { acceptInvitation } from '~~/server/services/invitations'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { token } = paramsOf(event, invitationTokenParamsSchema)
  return useDb().transaction().execute((trx) => acceptInvitation(trx, token, user))
})
