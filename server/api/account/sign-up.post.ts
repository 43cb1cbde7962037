import { signUpSchema } from '#shared/schemas/account'
import { signUp } from '~~/server/services/accounts'

// Public: creates the account (and its first organisation, or joins an invited one). Signing in follows on the client.
export default defineEventHandler(async (event) => {
  const input = await bodyOf(event, signUpSchema)
  const result = await signUp(input)
  setResponseStatus(event, 201)
  return result
})
