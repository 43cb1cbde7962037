import { inject } from 'vitest'

export interface ApiResponse<T = any> { status: number; body: T; headers: Headers }

/** A tiny HTTP client with a cookie jar: one instance is one browser-like session against the built app. */
export class ApiClient {
  private cookies = new Map<string, string>()
  constructor(readonly baseUrl: string = inject('baseUrl'), readonly address?: string) {}

  private cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  private keep(res: Response) {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      const name = pair!.slice(0, i).trim()
      const value = pair!.slice(i + 1).trim()
      if (/expires=Thu, 01 Jan 1970/i.test(c) || value === '') this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
  }

  async request<T = any>(method: string, path: string, body?: unknown, form = false, extraHeaders: Record<string, string> = {}): Promise<ApiResponse<T>> {
    // Like a browser on the app's own pages, every request names its origin (server/middleware/cross-site.ts refuses
    // state-changing requests from any other). An extra header set to '' leaves that header out.
    const headers: Record<string, string> = { accept: 'application/json', cookie: this.cookieHeader(), origin: new URL(this.baseUrl).origin, ...extraHeaders }
    for (const [k, v] of Object.entries(headers)) if (v === '') delete headers[k]
    let payload: string | undefined
    if (body !== undefined) {
      headers['content-type'] = form ? 'application/x-www-form-urlencoded' : 'application/json'
      payload = form ? new URLSearchParams(body as Record<string, string>).toString() : JSON.stringify(body)
    }
    const res = await fetch(`${this.baseUrl}${path}`, { method, headers, body: payload, redirect: 'manual' })
    this.keep(res)
    const text = await res.text()
    let parsed: any = text
    try { parsed = text ? JSON.parse(text) : null } catch { /* not JSON */ }
    return { status: res.status, body: parsed, headers: res.headers }
  }

  get<T = any>(path: string) { return this.request<T>('GET', path) }
  post<T = any>(path: string, body?: unknown) { return this.request<T>('POST', path, body ?? {}) }
  patch<T = any>(path: string, body?: unknown) { return this.request<T>('PATCH', path, body ?? {}) }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path) }

  /** Signs in through next-auth's credentials endpoint, as the sign-in page does. */
  async signIn(email: string, password: string): Promise<ApiResponse> {
    const csrf = await this.get<{ csrfToken: string }>('/api/auth/csrf')
    return this.request('POST', '/api/auth/callback/credentials', {
      email, password, csrfToken: csrf.body.csrfToken, callbackUrl: this.baseUrl, json: 'true',
    }, true)
  }

  async signOut(): Promise<void> {
    const csrf = await this.get<{ csrfToken: string }>('/api/auth/csrf')
    await this.request('POST', '/api/auth/signout', { csrfToken: csrf.body.csrfToken, callbackUrl: this.baseUrl, json: 'true' }, true)
  }

  hasSession() { return [...this.cookies.keys()].some((k) => k.includes('session-token')) }

  /** Sends the bytes exactly as given, with any content type or none (malformed-request tests); same cookies and origin. */
  async raw(method: string, path: string, payload?: Uint8Array, headers: Record<string, string> = {}): Promise<ApiResponse & { text: string }> {
    const all: Record<string, string> = { accept: 'application/json', cookie: this.cookieHeader(), origin: new URL(this.baseUrl).origin, ...headers }
    const res = await fetch(`${this.baseUrl}${path}`, { method, headers: all, body: payload ? new Uint8Array(payload) : undefined, redirect: 'manual' })
    this.keep(res)
    const text = await res.text()
    let body: any = text
    try { body = text ? JSON.parse(text) : null } catch { /* not JSON */ }
    return { status: res.status, body, headers: res.headers, text }
  }

  /** The same session (one cookie jar) against another address, e.g. one app instance behind the load balancer. */
  at(baseUrl: string): ApiClient {
    const other = new ApiClient(baseUrl)
    other.cookies = this.cookies
    return other
  }
}

/** Messages the local SMTP catcher received for one address, newest first. */
export async function mailFor(to: string): Promise<Array<{ subject: string; text: string; html: string; to: string[] }>> {
  const res = await fetch(`${inject('mailCatcherUrl')}/messages?to=${encodeURIComponent(to)}`)
  return res.json()
}

/** The first link in a message's text that contains `pathPart`. */
export function linkIn(text: string, pathPart: string): string {
  const m = text.match(new RegExp(`https?://\\S*${pathPart}\\S*`))
  if (!m) throw new Error(`No link containing ${pathPart} in: ${text}`)
  return m[0].replace(/[).,]+$/, '')
}

/** Signs up a fresh person with a new organisation and returns a signed-in client. */
export async function signUpOwner(name: string, email: string, organisationName: string, password = 'correct horse battery') {
  const client = new ApiClient()
  const res = await client.post('/api/account/sign-up', { name, email, password, organisationName })
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`)
  const signIn = await client.signIn(email, password)
  if (!client.hasSession()) throw new Error(`sign-in failed: ${signIn.status} ${JSON.stringify(signIn.body)}`)
  return { client, slug: res.body.organisation.slug as string, userId: res.body.user.id as string, password }
}

/** Invites `email` with `role` into the owner's organisation; the invitee signs up from the e-mailed link and signs in. */
export async function joinByInvitation(owner: ApiClient, slug: string, email: string, role: string, name: string, password: string) {
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const client = new ApiClient()
  const res = await client.post('/api/account/sign-up', { name, email, password, invitationToken: token })
  if (res.status !== 201) throw new Error(`sign-up from invitation failed: ${res.status} ${JSON.stringify(res.body)}`)
  await client.signIn(email, password)
  return { client, id: res.body.user.id as string }
}
