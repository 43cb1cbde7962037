// Session tokens, read on every request without redoing work that never changes.
//
// next-auth (v4) keeps the session in an encrypted JWT cookie (JWE, "dir" + A256GCM, with a key derived from the
// secret by HKDF). Its own decode derives that key again on every call, and its session endpoint re-encrypts a fresh
// cookie on every call; at 32 requests at once that was a large share of a request's time (scripts/bench/load.bench.ts).
// Here, with the same format and the same rules (jose, as next-auth uses it, and next-auth's own cookie reader):
//   - the key is derived once per secret;
//   - a token already decrypted is remembered (a token's content never changes; its expiry is checked on every use);
//   - API routes only read the session; the cookie's 14-day sliding renewal stays with next-auth's session endpoint,
//     which the app calls on load and on focus.
import type { H3Event } from 'h3'
import { hkdfSync, randomUUID } from 'node:crypto'
import { EncryptJWT, jwtDecrypt, type JWTPayload } from 'jose'
import { getToken } from 'next-auth/jwt'

/** What requireUser needs from a session token. */
export interface SessionClaims extends JWTPayload {
  sub?: string
  /** Milliseconds since 1970 of the sign-in (set once, in the jwt callback of server/api/auth/[...].ts). */
  authAt?: number
}

const keys = new Map<string, Uint8Array>()

/** The encryption key next-auth derives from its secret (next-auth/jwt getDerivedEncryptionKey), derived once. */
function keyFor(secret: string): Uint8Array {
  let key = keys.get(secret)
  if (!key) {
    key = new Uint8Array(hkdfSync('sha256', secret, '', 'NextAuth.js Generated Encryption Key', 32))
    keys.set(secret, key)
  }
  return key
}

/** Tokens already decrypted, oldest first; bounded so a flood of distinct tokens cannot grow it without end. */
const decoded = new Map<string, SessionClaims>()
const DECODED_LIMIT = 10_000
// jose's default tolerance in next-auth's decode: a token is accepted up to 15 s past its expiry.
const CLOCK_TOLERANCE_S = 15

function stillValid(claims: SessionClaims): boolean {
  return typeof claims.exp !== 'number' || claims.exp + CLOCK_TOLERANCE_S > Date.now() / 1000
}

/** next-auth's `jwt.decode`, with the derived key and the decrypted token remembered. Throws on a bad token. */
export async function decodeSessionToken({ token, secret }: { token?: string; secret: string | Buffer }): Promise<SessionClaims | null> {
  if (!token) return null
  const known = decoded.get(token)
  if (known) {
    if (stillValid(known)) return known
    decoded.delete(token)
  }
  const { payload } = await jwtDecrypt(token, keyFor(String(secret)), { clockTolerance: CLOCK_TOLERANCE_S })
  if (decoded.size >= DECODED_LIMIT) decoded.delete(decoded.keys().next().value!)
  decoded.set(token, payload)
  return payload
}

/** next-auth's `jwt.encode` (same header, claims and lifetime), with the derived key remembered. */
export async function encodeSessionToken({ token = {}, secret, maxAge = 30 * 86_400 }: { token?: JWTPayload; secret: string | Buffer; maxAge?: number }): Promise<string> {
  const now = Math.floor(Date.now() / 1000)
  return new EncryptJWT(token).setProtectedHeader({ alg: 'dir', enc: 'A256GCM' })
    .setIssuedAt(now).setExpirationTime(now + maxAge).setJti(randomUUID()).encrypt(keyFor(String(secret)))
}

/**
 * The claims of the request's session cookie, or null when there is none or it is not a valid, unexpired session
 * token. Reads the cookie as next-auth does (its name, `__Secure-` under https, split cookies); never the
 * Authorization header (that is an organisation API token, server/utils/api-tokens.ts).
 */
export async function readSessionClaims(event: H3Event): Promise<SessionClaims | null> {
  const config = useRuntimeConfig()
  const claims = await getToken({
    req: { cookies: parseCookies(event), headers: {} } as never,
    secret: config.authSecret,
    secureCookie: String(config.appUrl).startsWith('https://'),
    decode: decodeSessionToken as never,
    logger: { error: () => {}, warn: () => {}, debug: () => {} } as never,
  })
  return (claims as SessionClaims | null) ?? null
}
