import { accountEventsQuerySchema } from '#shared/audit'
import { listAccountEvents } from '~~/server/services/audit'

// The signed-in person's own sign-ins, sign-outs and password changes (account page).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { page, pageSize } = queryOf(event, accountEventsQuerySchema)
  return listAccountEvents(user.id, page, pageSize)
})
