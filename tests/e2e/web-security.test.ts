import { encode } from 'next-auth/jwt'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { ApiClient, joinByInvitation, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { startAppProcess, stopAppProcess, type AppProcess } from '../support/app-process'
import { testEnv } from '../support/env'
import { makeOrg, surveyWith, withToken, type Org } from '../support/integration-fixtures'

// Web security: headers and content security policy, the cross-site request rule (server/middleware/cross-site.ts),
// session cookie flags, session expiry and revocation. Against the built app, as a browser or an attacker would talk to it.

const base = () => inject('baseUrl')
const appOrigin = () => new URL(base()).origin
const EVIL = 'https://greybody-lookalike.example'

let org: Org
let workOrder: { id: string; version: number }

beforeAll(async () => {
  await resetDatabase()
  org = await makeOrg('websec', ['T1'])
  const s = await surveyWith(org, '2026-05-04', [{ asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 60, referenceC: 40 }])
  const wo = await org.owner.post(`/api/orgs/${org.slug}/work-orders`, { findingIds: [s.findingIds[0]] })
  expect(wo.status, JSON.stringify(wo.body)).toBe(201)
  workOrder = { id: wo.body.id, version: wo.body.version }
}, 120_000)

/** The directives of a Content-Security-Policy header, each with its sources. */
function cspOf(header: string | null): Record<string, string[]> {
  expect(header, 'Content-Security-Policy header').toBeTruthy()
  return Object.fromEntries(header!.split(';').map((d) => d.trim()).filter(Boolean).map((d) => {
    const [name, ...sources] = d.split(/\s+/)
    return [name!, sources]
  }))
}

describe('security headers and the content security policy', () => {
  it('serves each page with a strict policy whose nonce is on every script the page carries', async () => {
    const res = await fetch(`${base()}/sign-in`)
    expect(res.status).toBe(200)
    const html = await res.text()
    const csp = cspOf(res.headers.get('content-security-policy'))
    const nonce = csp['script-src']!.find((s) => s.startsWith("'nonce-"))!.slice(7, -1)
    expect(nonce).toMatch(/^[A-Za-z0-9+/=_-]{16,}$/)
    expect(csp['script-src']).toEqual(["'self'", `'nonce-${nonce}'`, "'strict-dynamic'"])
    expect(csp['script-src-attr']).toEqual(["'none'"])
    expect(csp['style-src']).toEqual(["'self'", `'nonce-${nonce}'`])
    for (const sources of Object.values(csp)) {
      expect(sources).not.toContain("'unsafe-eval'")
    }
    expect(csp['script-src']).not.toContain("'unsafe-inline'")
    expect(csp['default-src']).toEqual(["'self'"])
    expect(csp['object-src']).toEqual(["'none'"])
    expect(csp['base-uri']).toEqual(["'none'"])
    expect(csp['frame-ancestors']).toEqual(["'none'"])
    expect(csp['form-action']).toEqual(["'self'"])
    // Served over http here: upgrading would break the local object store's http images.
    expect(csp['upgrade-insecure-requests']).toBeUndefined()
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0])
    expect(scripts.length).toBeGreaterThan(0)
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`)
    // A fresh nonce for every response.
    const again = cspOf((await fetch(`${base()}/sign-in`)).headers.get('content-security-policy'))
    expect(again['script-src']).not.toContain(`'nonce-${nonce}'`)
  })

  it('lets pages load images from, and upload to, the configured object store only', async () => {
    const storage = new URL(testEnv().NUXT_S3_ENDPOINT!).origin
    const csp = cspOf((await fetch(`${base()}/sign-in`)).headers.get('content-security-policy'))
    expect(csp['img-src']).toEqual(["'self'", 'data:', 'blob:', storage])
    expect(csp['connect-src']).toEqual(["'self'", storage])
  })

  it('sends the other protective headers, on pages and on API answers', async () => {
    const page = await fetch(`${base()}/sign-in`)
    expect(page.headers.get('x-content-type-options')).toBe('nosniff')
    expect(page.headers.get('x-frame-options')).toBe('DENY')
    expect(page.headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin')
    expect(page.headers.get('cross-origin-opener-policy')).toBe('same-origin')
    const permissions = page.headers.get('permissions-policy')!
    for (const feature of ['camera', 'microphone', 'geolocation', 'payment', 'usb']) expect(permissions).toContain(`${feature}=()`)
    // Over http a browser ignores HSTS; it is sent only when the app's URL is https (see below).
    expect(page.headers.get('strict-transport-security')).toBeNull()
    expect(page.headers.get('x-powered-by')).toBeNull()
    const api = await fetch(`${base()}/api/health`)
    expect(api.headers.get('x-content-type-options')).toBe('nosniff')
    expect(api.headers.get('x-frame-options')).toBe('DENY')
    expect(api.headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin')
  })

  it('refuses bodies over 2 MB except where a grid or an import piece needs more', async () => {
    const big = JSON.stringify({ code: 'BIG-1', name: 'x'.repeat(2_100_000) })
    const site = await fetch(`${base()}/api/orgs/${org.slug}/sites`, {
      method: 'POST', headers: { 'content-type': 'application/json', origin: appOrigin(), accept: 'application/json' }, body: big,
    })
    expect(site.status).toBe(413)
    // A 2.1 MB grid upload reaches the route (and is checked there: the asset id is wrong on purpose).
    const grid = await org.owner.post(`/api/orgs/${org.slug}/surveys/00000000-0000-4000-8000-000000000000/grids`, {
      assetId: 'not-an-asset', unit: 'C', fileName: 'big.csv', csv: '20.5,'.repeat(420_000),
    })
    expect(grid.status).not.toBe(413)
    expect([400, 404]).toContain(grid.status)
  })
})

describe('cross-site requests with a valid session cookie', () => {
  const refused = (res: { status: number; body: any }) => {
    expect(res.status).toBe(403)
    expect(res.body.data.message).toBe('This change was sent from another site, so it was refused. Open Greybody itself and try again.')
  }

  it('refuses a POST, PATCH and DELETE from another site and changes nothing', async () => {
    const member = await joinByInvitation(org.owner, org.slug, 'kai@websec.test', 'viewer', 'Kai Moor', 'kai long password')
    const sitesBefore = await testDb().selectFrom('sites').select('id').where('name', '=', 'Forged site').execute()
    const orgBefore = (await org.owner.get(`/api/orgs/${org.slug}`)).body
    const cross = { origin: EVIL, 'sec-fetch-site': 'cross-site' }

    refused(await org.owner.request('POST', `/api/orgs/${org.slug}/sites`, { code: 'EVIL-1', name: 'Forged site', kind: 'substation', latitude: 54, longitude: -2 }, false, cross))
    refused(await org.owner.request('PATCH', `/api/orgs/${org.slug}`, { name: 'Taken over', version: orgBefore.version }, false, cross))
    refused(await org.owner.request('DELETE', `/api/orgs/${org.slug}/members/${member.id}`, undefined, false, cross))
    refused(await org.owner.request('POST', '/api/account/password', { currentPassword: 'correct horse battery', newPassword: 'chosen by someone else' }, false, cross))

    expect(await testDb().selectFrom('sites').select('id').where('name', '=', 'Forged site').execute()).toEqual(sitesBefore)
    expect((await org.owner.get(`/api/orgs/${org.slug}`)).body).toMatchObject({ name: orgBefore.name, version: orgBefore.version })
    const members = (await org.owner.get(`/api/orgs/${org.slug}/members`)).body as Array<{ email: string }>
    expect(members.map((m) => m.email)).toContain('kai@websec.test')
    expect((await member.client.get(`/api/orgs/${org.slug}`)).status).toBe(200)
  })

  it('refuses every way of naming another origin, or none', async () => {
    const path = `/api/orgs/${org.slug}/sites`
    const body = { code: 'EVIL-2', name: 'Forged site', kind: 'substation', latitude: 54, longitude: -2 }
    // Older browsers: Origin only.
    refused(await org.owner.request('POST', path, body, false, { origin: EVIL }))
    // A sandboxed frame or a privacy redirect sends "null".
    refused(await org.owner.request('POST', path, body, false, { origin: 'null' }))
    // A sibling site on the same registrable domain is not this app.
    refused(await org.owner.request('POST', path, body, false, { origin: appOrigin(), 'sec-fetch-site': 'same-site' }))
    // No Origin: the Referer decides.
    refused(await org.owner.request('POST', path, body, false, { origin: '', referer: `${EVIL}/pay-now` }))
    // Nothing names an origin.
    refused(await org.owner.request('POST', path, body, false, { origin: '' }))
    // The app's host on another port or scheme is another origin.
    const other = new URL(base())
    other.port = String(Number(other.port || 80) + 1)
    refused(await org.owner.request('POST', path, body, false, { origin: other.origin }))
    expect(await testDb().selectFrom('sites').select('id').where('code', '=', 'EVIL-2').execute()).toEqual([])
  })

  it('accepts the same requests from the app itself', async () => {
    const path = `/api/orgs/${org.slug}/sites`
    const site = (code: string) => ({ code, name: `Own site ${code}`, kind: 'substation', latitude: 54, longitude: -2 })
    // What Chromium sends on the app's own fetch.
    expect((await org.owner.request('POST', path, site('OWN-1'), false, { origin: appOrigin(), 'sec-fetch-site': 'same-origin' })).status).toBe(201)
    // Origin only.
    expect((await org.owner.request('POST', path, site('OWN-2'))).status).toBe(201)
    // Referer only (a browser that left Origin out).
    expect((await org.owner.request('POST', path, site('OWN-3'), false, { origin: '', referer: `${base()}/orgs/${org.slug}/sites` })).status).toBe(201)
    const current = (await org.owner.get(`/api/orgs/${org.slug}`)).body
    expect((await org.owner.request('PATCH', `/api/orgs/${org.slug}`, { name: 'Websec Power North', version: current.version }, false, { origin: appOrigin(), 'sec-fetch-site': 'same-origin' })).status).toBe(200)
  })

  it('refuses a cross-site sign-in (login CSRF), and signs in from the app', async () => {
    const attacker = new ApiClient()
    const csrf = await attacker.get<{ csrfToken: string }>('/api/auth/csrf')
    const res = await attacker.request('POST', '/api/auth/callback/credentials', {
      email: 'websec-owner@integration.test', password: 'correct horse battery', csrfToken: csrf.body.csrfToken, callbackUrl: base(), json: 'true',
    }, true, { origin: EVIL })
    expect(res.status).toBe(403)
    expect(attacker.hasSession()).toBe(false)
    await attacker.signIn('websec-owner@integration.test', 'correct horse battery')
    expect(attacker.hasSession()).toBe(true)
  })

  it('lets API tokens, the payment provider and one-click unsubscribe through without an Origin', async () => {
    const token = await org.owner.post(`/api/orgs/${org.slug}/api-tokens`, { name: 'Maintenance system', scope: 'read_write' })
    expect(token.status, JSON.stringify(token.body)).toBe(201)
    const move = await withToken(base(), token.body.secret, 'POST', `/api/orgs/${org.slug}/work-orders/${workOrder.id}/move`, { to: 'planned', version: workOrder.version })
    expect(move.status, JSON.stringify(move.body)).toBe(200)
    expect(move.body.state).toBe('planned')
    // The webhook reaches its own signature check.
    const hook = await fetch(`${base()}/api/stripe/webhook`, { method: 'POST', headers: { 'content-type': 'application/json', accept: 'application/json' }, body: '{}' })
    expect(hook.status).toBe(400)
    expect((await hook.json()).data.message).toBe('Missing Stripe-Signature header.')
    // A mail client's one-click POST reaches the token check (this token is forged, so it is refused there, not here).
    const unsub = await fetch(`${base()}/api/notices/unsubscribe?token=forged`, {
      method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json' }, body: 'List-Unsubscribe=One-Click',
    })
    expect(unsub.status).not.toBe(403)
    expect(unsub.status).toBeGreaterThanOrEqual(400)
    expect(unsub.status).toBeLessThan(500)
  })
})

describe('session cookies', () => {
  it('are HttpOnly, SameSite=Lax, for the whole site and 14 days, and not Secure over http', async () => {
    const client = new ApiClient()
    const csrf = await client.get<{ csrfToken: string }>('/api/auth/csrf')
    const csrfCookie = csrf.headers.getSetCookie().find((c) => c.startsWith('next-auth.csrf-token='))!
    expect(csrfCookie).toMatch(/; HttpOnly/i)
    expect(csrfCookie).toMatch(/; SameSite=Lax/i)
    const before = Date.now()
    const res = await client.request('POST', '/api/auth/callback/credentials', {
      email: 'websec-owner@integration.test', password: 'correct horse battery', csrfToken: csrf.body.csrfToken, callbackUrl: base(), json: 'true',
    }, true)
    const session = res.headers.getSetCookie().find((c) => c.startsWith('next-auth.session-token='))
    expect(session, res.headers.getSetCookie().join('\n')).toBeTruthy()
    const attrs = session!.split(';').slice(1).map((a) => a.trim())
    expect(attrs).toContain('HttpOnly')
    expect(attrs).toContain('SameSite=Lax')
    expect(attrs).toContain('Path=/')
    expect(attrs.map((a) => a.toLowerCase())).not.toContain('secure')
    const expires = Date.parse(attrs.find((a) => a.startsWith('Expires='))!.slice(8))
    expect(Math.abs(expires - (before + 14 * 86_400_000))).toBeLessThan(120_000)
  })
})

describe('session expiry and revocation', () => {
  const secret = () => testEnv().NUXT_AUTH_SECRET!
  /** A session token as next-auth issues it, signed with the app's secret, for a chosen sign-in time and lifetime. */
  async function sessionWith(authAt: number, maxAge: number) {
    const jwt = await encode({ token: { sub: org.ownerId, authAt }, secret: secret(), maxAge })
    return fetch(`${base()}/api/account/me`, { headers: { accept: 'application/json', cookie: `next-auth.session-token=${jwt}` } })
  }

  it('refuses a session token past its expiry, and one signed in more than 30 days ago', async () => {
    // The control: a token made this way is a working session.
    expect((await sessionWith(Date.now(), 3600)).status).toBe(200)
    const expired = await sessionWith(Date.now() - 15 * 86_400_000, -60)
    expect(expired.status).toBe(401)
    expect((await expired.json()).data.message).toBe('Please sign in.')
    // Sessions older than the password are refused anyway: date the password before both sessions below.
    await testDb().updateTable('users').set({ password_changed_at: new Date(Date.now() - 40 * 86_400_000) }).where('id', '=', org.ownerId).execute()
    expect((await sessionWith(Date.now() - 29 * 86_400_000, 3600)).status).toBe(200)
    const old = await sessionWith(Date.now() - 31 * 86_400_000, 3600)
    expect(old.status).toBe(401)
    expect((await old.json()).data.message).toMatch(/signed in more than 30 days ago/)
  })

  it('ends open sessions when the password is reset by e-mail', async () => {
    const { client: laptop } = await signUpOwner('Rhea Stone', 'rhea@websec.test', 'Rhea Grid')
    expect((await laptop.get('/api/account/me')).status).toBe(200)
    await new Promise((r) => setTimeout(r, 1100))
    await new ApiClient().post('/api/account/password-reset', { email: 'rhea@websec.test' })
    const [mail] = await mailFor('rhea@websec.test')
    const token = new URL(linkIn(mail!.text, '/reset-password')).searchParams.get('token')!
    expect((await new ApiClient().post('/api/account/password-reset/confirm', { token, password: 'rhea fresh password' })).status).toBe(200)
    const stale = await laptop.get('/api/account/me')
    expect(stale.status).toBe(401)
    expect(stale.body.data.message).toMatch(/password was changed/)
  })

  it('stops a removed member at their next request, writes included', async () => {
    const { client: owner, slug } = await signUpOwner('Tam Reed', 'tam@websec.test', 'Tam Networks')
    const mgr = await joinByInvitation(owner, slug, 'uma@websec.test', 'manager', 'Uma Penn', 'uma long password')
    const site = (code: string) => ({ code, name: `Site ${code}`, kind: 'substation', latitude: 54, longitude: -2 })
    expect((await mgr.client.post(`/api/orgs/${slug}/sites`, site('UMA-1'))).status).toBe(201)
    expect((await owner.delete(`/api/orgs/${slug}/members/${mgr.id}`)).status).toBe(204)
    const write = await mgr.client.post(`/api/orgs/${slug}/sites`, site('UMA-2'))
    expect(write.status).toBe(403)
    expect(write.body.data.message).toMatch(/no longer a member of Tam Networks/)
    expect(await testDb().selectFrom('sites').select('code').where('code', 'in', ['UMA-1', 'UMA-2']).execute()).toEqual([{ code: 'UMA-1' }])
    expect((await mgr.client.get(`/api/orgs/${slug}/sites`)).status).toBe(403)
  })
})

// ---- An instance configured for https (served over http here, as behind a TLS-terminating proxy) ----

let httpsApp: AppProcess | undefined

afterAll(() => stopAppProcess(httpsApp))

describe('when the app URL is https', () => {
  it('sends HSTS, upgrades insecure requests and makes the session cookie Secure', async () => {
    const publicUrl = 'https://greybody.websec.test'
    httpsApp = await startAppProcess({ NUXT_APP_URL: publicUrl, AUTH_ORIGIN: `${publicUrl}/api/auth`, GREYBODY_REPORT_WORKER: 'off' })
    const local = httpsApp.url

    const page = await fetch(`${local}/sign-in`)
    expect(page.headers.get('strict-transport-security')).toBe('max-age=31536000; includeSubDomains')
    expect(cspOf(page.headers.get('content-security-policy'))['upgrade-insecure-requests']).toEqual([])

    // The browser is at the public https origin; the proxy forwards to this instance.
    const client = new ApiClient(local)
    const csrf = await client.request<{ csrfToken: string }>('GET', '/api/auth/csrf', undefined, false, { origin: '' })
    expect(csrf.headers.getSetCookie().find((c) => c.startsWith('__Host-next-auth.csrf-token='))).toMatch(/; Secure/i)
    const res = await client.request('POST', '/api/auth/callback/credentials', {
      email: 'websec-owner@integration.test', password: 'correct horse battery', csrfToken: csrf.body.csrfToken, callbackUrl: publicUrl, json: 'true',
    }, true, { origin: publicUrl })
    const session = res.headers.getSetCookie().find((c) => c.startsWith('__Secure-next-auth.session-token='))
    expect(session, `${res.status} ${res.headers.getSetCookie().join('\n')}`).toBeTruthy()
    const attrs = session!.split(';').slice(1).map((a) => a.trim())
    expect(attrs).toEqual(expect.arrayContaining(['HttpOnly', 'SameSite=Lax', 'Path=/', 'Secure']))
    // The public origin is accepted for changes; another is not.
    expect((await client.request('PATCH', '/api/account/me', { name: 'Websec Owner' }, false, { origin: publicUrl })).status).toBe(200)
    expect((await client.request('PATCH', '/api/account/me', { name: 'Websec Owner' }, false, { origin: EVIL })).status).toBe(403)
  }, 120_000)
})
