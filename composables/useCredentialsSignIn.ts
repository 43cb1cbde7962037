// Sign-in with e-mail and password through nuxt-auth, with the error codes turned into plain messages.
const MESSAGES: Record<string, string> = {
  CredentialsSignin: 'E-mail or password is incorrect.',
  TooManyAttempts: 'Too many failed sign-in attempts. Wait a few minutes and try again, or reset your password.',
  SessionRequired: 'Please sign in to continue.',
}

/** Sign in with credentials; throws an API-shaped error (`{ data: { message } }`) on failure. */
export function useCredentialsSignIn() {
  const { signIn } = useAuth()

  function messageForError(code: string): string {
    return MESSAGES[code] ?? 'Signing in did not work. Try again in a moment.'
  }

  async function signInWithCredentials(email: string, password: string, callbackUrl = '/'): Promise<void> {
    let error: string | null | undefined
    try {
      // callbackUrl must be sent: without it the auth client posts the string "undefined", which next-auth cannot parse.
      const result = await signIn('credentials', { email, password, redirect: false, callbackUrl })
      error = result?.error
    } catch (err) {
      // A 429 without a readable body, or the network failing, ends up here.
      const status = (err as { statusCode?: number; status?: number })?.statusCode ?? (err as { status?: number })?.status
      error = status === 429 ? 'TooManyAttempts' : 'Default'
    }
    if (error) throw { data: { message: messageForError(error) }, statusCode: error === 'TooManyAttempts' ? 429 : 401 }
    // Data cached for a previous person (other tab, earlier session) must not leak into this one.
    clearNuxtData()
  }

  return { signInWithCredentials, messageForError }
}
