import { profileOf } from '~~/server/services/accounts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return profileOf(user)
})
