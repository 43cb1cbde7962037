import { sql } from 'kysely'
import type { H3Event } from 'h3'

/** Header through which the sign-in middleware hands the client address to the credentials check. */
export const CLIENT_ADDRESS_HEADER = 'x-greybody-client-address'

function limits() {
  const config = useRuntimeConfig()
  const perEmail = Number(config.signInLimit) || 10
  return { perEmail, perAddress: perEmail * 3, windowSeconds: Number(config.signInWindowSeconds) || 900 }
}

/** The client's address; X-Forwarded-For is trusted only when NUXT_TRUST_PROXY is set (behind a load balancer). */
export function clientAddress(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: process.env.NUXT_TRUST_PROXY === '1' }) ?? 'unknown'
}

/** Records one failed sign-in for the rate limit. */
export async function recordSignInFailure(email: string, address: string): Promise<void> {
  await useDb().insertInto('sign_in_failures').values({ email: email.toLowerCase().slice(0, 254), address }).execute()
}

/** Whether this e-mail or this address has failed too often in the window; and when it may try again. */
export async function signInBlocked(email: string, address: string): Promise<{ blocked: boolean; retryAfterSeconds: number }> {
  const { perEmail, perAddress, windowSeconds } = limits()
  const since = new Date(Date.now() - windowSeconds * 1000)
  const db = useDb()
  const [byEmail, byAddress] = await Promise.all([
    db.selectFrom('sign_in_failures')
      .select([sql<number>`count(*)::int`.as('n'), sql<Date | null>`min(failed_at)`.as('first')])
      .where(sql`lower(email)`, '=', email.toLowerCase())
      .where('failed_at', '>', since)
      .executeTakeFirstOrThrow(),
    db.selectFrom('sign_in_failures')
      .select([sql<number>`count(*)::int`.as('n'), sql<Date | null>`min(failed_at)`.as('first')])
      .where('address', '=', address)
      .where('failed_at', '>', since)
      .executeTakeFirstOrThrow(),
  ])
  const over = [byEmail.n >= perEmail ? byEmail.first : null, byAddress.n >= perAddress ? byAddress.first : null]
    .filter((d): d is Date => !!d)
  if (!over.length) return { blocked: false, retryAfterSeconds: 0 }
  const earliest = Math.max(...over.map((d) => new Date(d).getTime()))
  return { blocked: true, retryAfterSeconds: Math.max(1, Math.ceil((earliest + windowSeconds * 1000 - Date.now()) / 1000)) }
}
