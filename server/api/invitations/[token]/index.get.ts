import { sql } from 'kysely'
import { invitationTokenParamsSchema } from '#shared/schemas/organisation'
import { usableInvitation } from '~~/server/services/invitations'

// Public: the link token is the credential; it reveals only what the e-mail already said.
export default defineEventHandler(async (event) => {
  const { token } = paramsOf(event, invitationTokenParamsSchema)
  const inv = await usableInvitation(useDb(), token)
  const account = await useDb().selectFrom('users').select('id').where(sql`lower(email)`, '=', inv.email.toLowerCase()).executeTakeFirst()
  return { organisationName: inv.org_name, email: inv.email, role: inv.role, expiresAt: inv.expires_at, hasAccount: !!account }
})
