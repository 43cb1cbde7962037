import { z } from 'zod'

const signInKeySchema = z.object({ email: z.string().max(254) })

// Rate-limits credential sign-ins per e-mail and per client address before next-auth sees them.
export default defineEventHandler(async (event) => {
  if (event.method !== 'POST' || !event.path.startsWith('/api/auth/callback/credentials')) return
  // The address comes from the connection (or a trusted proxy), never from a header the client chose.
  const address = clientAddress(event)
  event.node.req.headers[CLIENT_ADDRESS_HEADER] = address
  // Only the e-mail matters here (the rate-limit key); a malformed body still counts against the address.
  const parsed = signInKeySchema.safeParse(await readBody(event).catch(() => ({})))
  const email = parsed.success ? parsed.data.email.trim().toLowerCase() : ''
  const { blocked, retryAfterSeconds } = await signInBlocked(email, address)
  if (!blocked) return
  const minutes = Math.ceil(retryAfterSeconds / 60)
  setResponseHeader(event, 'Retry-After', retryAfterSeconds)
  setResponseStatus(event, 429, 'Too many sign-in attempts')
  // The url field lets the auth client read the error code the way it reads next-auth's own errors.
  return {
    statusCode: 429,
    message: `Too many failed sign-in attempts. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again, or reset your password.`,
    url: `${getRequestURL(event).origin}/sign-in?error=TooManyAttempts&retryAfter=${retryAfterSeconds}`,
  }
})
