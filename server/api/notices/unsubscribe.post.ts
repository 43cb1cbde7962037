// One-click unsubscribe (RFC 8058): a mail client POSTs "List-Unsubscribe=One-Click" to the List-Unsubscribe URL;
// the confirmation page POSTs JSON { byEmail } to turn the e-mails off or back on. No sign-in: the signed token decides.
import { z } from 'zod'
import { noticeTokenQuerySchema } from '#shared/schemas/notices'
import { changeByToken } from '~~/server/services/notices'

const bodySchema = z.object({ byEmail: z.boolean().optional() }).passthrough()

export default defineEventHandler(async (event) => {
  const { token } = queryOf(event, noticeTokenQuerySchema)
  const raw = await readBody(event).catch(() => undefined)
  const parsed = bodySchema.safeParse(raw && typeof raw === 'object' ? raw : {})
  // Anything but an explicit { byEmail: true } turns e-mail off: that is what the one-click POST means.
  const byEmail = parsed.success && parsed.data.byEmail === true
  setResponseHeader(event, 'cache-control', 'no-store')
  return changeByToken(token, byEmail)
})
