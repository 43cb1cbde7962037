// Cross-site request forgery defence for every state-changing API request (OWASP CSRF Prevention Cheat Sheet:
// "Fetch Metadata headers" and "Verifying origin with standard headers"). A session cookie is sent by the browser
// whatever page starts the request, so a POST, PUT, PATCH or DELETE is accepted only when the browser says it came
// from this app: Sec-Fetch-Site is same-origin, or (browsers that do not send it) Origin — else Referer — is the
// app's own origin. A request that names no origin at all is refused too.
//
// Not checked, because no cookie decides them:
// - `Authorization: Bearer` requests (API tokens): a page on another site cannot add that header without a CORS
//   preflight, which this app never allows, and requireMember then ignores any cookie;
// - POST /api/stripe/webhook: the provider's server calls it; the Stripe-Signature over the exact body decides;
// - POST /api/notices/unsubscribe: RFC 8058 one-click unsubscribe comes from a mail client with no Origin; the
//   signed token in the URL decides and names one person's choice for one kind of notice.
import type { H3Event } from 'h3'

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])
const EXEMPT_PATHS = new Set(['/api/stripe/webhook', '/api/notices/unsubscribe'])

function originOf(url: string | undefined): string | null {
  if (!url) return null
  try {
    const origin = new URL(url).origin
    return origin === 'null' ? null : origin
  } catch {
    return null
  }
}

/** The origins this app is served at: NUXT_APP_URL's, and the one this request was addressed to. */
function ownOrigins(event: H3Event): Set<string> {
  const trustProxy = process.env.NUXT_TRUST_PROXY === '1'
  const own = new Set<string>()
  const configured = originOf(String(useRuntimeConfig(event).appUrl || ''))
  if (configured) own.add(configured)
  own.add(getRequestURL(event, { xForwardedHost: trustProxy, xForwardedProto: trustProxy }).origin)
  return own
}

function refuse(): never {
  throw createError({
    statusCode: 403,
    statusMessage: 'Cross-site request refused',
    data: { message: 'This change was sent from another site, so it was refused. Open Greybody itself and try again.' },
  })
}

export default defineEventHandler((event) => {
  if (SAFE_METHODS.has(event.method) || !event.path.startsWith('/api/')) return
  if (EXEMPT_PATHS.has(event.path.split('?')[0]!)) return
  if (bearerOf(event) !== null) return

  const site = getHeader(event, 'sec-fetch-site')
  if (site) {
    if (site === 'same-origin') return
    refuse()
  }
  const origin = getHeader(event, 'origin')
  const claimed = origin !== undefined ? originOf(origin) : originOf(getHeader(event, 'referer'))
  if (!claimed || !ownOrigins(event).has(claimed)) refuse()
})
