import { passwordResetRequestSchema } from '#shared/schemas/account'
import { requestPasswordReset } from '~~/server/services/accounts'

// Public, and deliberately silent about whether the address has an account.
export default defineEventHandler(async (event) => {
  const { email } = await bodyOf(event, passwordResetRequestSchema)
  const { blocked } = await signInBlocked(email, clientAddress(event))
  if (!blocked) await requestPasswordReset(email)
  setResponseStatus(event, 202)
  return { message: `If ${email} has a Greybody account, a reset link is on its way. It works for 60 minutes.` }
})
