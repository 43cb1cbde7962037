import { passwordResetConfirmSchema } from '#shared/schemas/account'
import { confirmPasswordReset } from '~~/server/services/accounts'

// Public: the token in the e-mailed link is the credential.
export default defineEventHandler(async (event) => {
  const { token, password } = await bodyOf(event, passwordResetConfirmSchema)
  const { email } = await confirmPasswordReset(token, password)
  return { email, message: 'Your password has been changed. Sign in with the new one.' }
})
