import CredentialsProvider from 'next-auth/providers/credentials'
import { NuxtAuthHandler } from '#auth'
import { signInSchema } from '#shared/schemas/account'
import { recordSignIn, recordSignOut } from '~~/server/services/audit'
import { decodeSessionToken, encodeSessionToken } from '~~/server/utils/session-token'

// Nitro's ESM output exposes the provider factory on .default.
const Credentials = ((CredentialsProvider as any).default ?? CredentialsProvider) as typeof CredentialsProvider

export default NuxtAuthHandler({
  secret: useRuntimeConfig().authSecret,
  // A session token is valid 14 days after it was last re-issued (the app reads the session on load and on focus);
  // requireUser also ends every session 30 days after its sign-in and any opened before a password change.
  session: { strategy: 'jwt', maxAge: 60 * 60 * 24 * 14 },
  // next-auth's own token format, with its derived key and decrypted tokens remembered (server/utils/session-token.ts).
  jwt: { encode: encodeSessionToken, decode: decodeSessionToken as never },
  // Session cookies are HttpOnly and SameSite=Lax (next-auth's defaults); Secure, with the __Secure-/__Host- names,
  // whenever the app is served over https.
  useSecureCookies: String(useRuntimeConfig().appUrl).startsWith('https://'),
  pages: { signIn: '/sign-in', error: '/sign-in' },
  providers: [
    Credentials({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {})
        const address = String((req?.headers as Record<string, string> | undefined)?.[CLIENT_ADDRESS_HEADER] ?? 'unknown')
        if (!parsed.success) {
          await recordSignInFailure(String(credentials?.email ?? ''), address)
          await recordSignIn(String(credentials?.email ?? ''), 'refused')
          return null
        }
        const user = await authenticate(parsed.data.email, parsed.data.password)
        if (!user) {
          await recordSignInFailure(parsed.data.email, address)
          await recordSignIn(parsed.data.email, 'refused')
          return null
        }
        await recordSignIn(parsed.data.email, { userId: user.id })
        return { id: user.id, name: user.name, email: user.email }
      },
    }),
  ],
  // The audit log keeps sign-outs on the person's own account (sign-ins are recorded in authorize above).
  events: {
    async signOut(message) {
      await recordSignOut((message as { token?: { sub?: string } }).token?.sub)
    },
  },
  callbacks: {
    // Only same-origin redirects, and a missing or malformed callback falls back to the app's root instead of a 500.
    redirect({ url, baseUrl }) {
      try {
        const target = new URL(url, baseUrl)
        return target.origin === new URL(baseUrl).origin ? target.toString() : baseUrl
      } catch {
        return baseUrl
      }
    },
    jwt({ token, user }) {
      // authAt is set once, at sign-in (next-auth re-stamps iat on every refresh): sessions older than the last
      // password change are refused by requireUser.
      if (user) {
        token.sub = user.id
        token.authAt = Date.now()
      }
      return token
    },
    session({ session, token }) {
      ;(session.user as Record<string, unknown>).id = token.sub
      ;(session as unknown as Record<string, unknown>).authAt = token.authAt
      return session
    },
  },
})
