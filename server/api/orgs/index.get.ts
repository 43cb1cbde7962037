import { organisationsOf } from '~~/server/services/organisations'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return organisationsOf(useDb(), user.id)
})
