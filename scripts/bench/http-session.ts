// A signed-in HTTP session against a running Greybody server, for the benchmarks (cookies kept by hand, as a
// browser would; sign-in through next-auth's credentials endpoint, as the sign-in page does).
import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync } from 'node:fs'

/** One signed-in session with a cookie jar. */
export class HttpSession {
  private cookies = new Map<string, string>()
  constructor(readonly baseUrl: string) {}

  private keep(res: Response) {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      this.cookies.set(pair!.slice(0, i).trim(), pair!.slice(i + 1).trim())
    }
  }

  /** The Cookie header this session sends (for load tools that make their own requests). */
  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  /** Sends a request; the body is JSON unless `form` is set. */
  async request(method: string, path: string, body?: unknown, form = false, extraHeaders: Record<string, string> = {}): Promise<{ status: number; text: string; json: () => any }> {
    // The app's own origin, as a browser sends it: state-changing requests from anywhere else are refused (403).
    const headers: Record<string, string> = { accept: 'application/json', origin: new URL(this.baseUrl).origin, cookie: [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; '), ...extraHeaders }
    let payload: string | undefined
    if (body !== undefined) {
      headers['content-type'] = form ? 'application/x-www-form-urlencoded' : 'application/json'
      payload = form ? new URLSearchParams(body as Record<string, string>).toString() : JSON.stringify(body)
    }
    const res = await fetch(`${this.baseUrl}${path}`, { method, headers, body: payload, redirect: 'manual' })
    this.keep(res)
    const text = await res.text()
    return { status: res.status, text, json: () => JSON.parse(text) }
  }

  /** Signs in with e-mail and password; throws when no session cookie comes back. */
  async signIn(email: string, password: string) {
    const csrf = (await this.request('GET', '/api/auth/csrf')).json().csrfToken
    await this.request('POST', '/api/auth/callback/credentials', { email, password, csrfToken: csrf, callbackUrl: this.baseUrl, json: 'true' }, true)
    if (![...this.cookies.keys()].some((k) => k.includes('session-token'))) throw new Error(`Sign-in as ${email} failed (run scripts/seed-large.ts first?)`)
  }
}

/** Nearest-rank percentile of a list of numbers. */
export function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))]!
}

/**
 * The app at NUXT_APP_URL when it answers; otherwise starts the built server (.output, or .output-<profile> with
 * GREYBODY_TEST_PROFILE) with the current environment and stops it afterwards.
 */
export async function withApp<T>(run: (baseUrl: string) => Promise<T>): Promise<T> {
  const baseUrl = process.env.NUXT_APP_URL || 'http://127.0.0.1:3000'
  const up = async () => fetch(`${baseUrl}/api/health`).then((r) => r.ok, () => false)
  let child: ChildProcess | undefined
  if (!(await up())) {
    const profile = process.env.GREYBODY_TEST_PROFILE
    const dir = profile && profile !== 'test' ? `.output-${profile}` : '.output'
    if (!existsSync(`${dir}/server/index.mjs`)) throw new Error(`No app at ${baseUrl} and no build in ${dir}: run the build first.`)
    child = spawn('node', [`${dir}/server/index.mjs`], { env: { ...process.env, NODE_ENV: 'production' }, stdio: 'ignore' })
    for (let i = 0; i < 240 && !(await up()); i++) await new Promise((r) => setTimeout(r, 250))
    if (!(await up())) throw new Error(`The built server did not answer ${baseUrl}/api/health`)
  }
  try {
    return await run(baseUrl)
  } finally {
    child?.kill('SIGTERM')
  }
}
