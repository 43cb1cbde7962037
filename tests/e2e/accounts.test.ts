import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'

beforeAll(resetDatabase)

describe('health', () => {
  it('reports the database connection', async () => {
    const res = await new ApiClient().get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'ok', database: 'ok' })
  })
})

describe('sign-up and sign-in', () => {
  it('creates a user, an organisation they own, and signs in', async () => {
    const { client, slug } = await signUpOwner('Alma Reed', 'alma@accounts.test', 'Alma Grid Co')
    expect(slug).toBe('alma-grid-co')
    const me = await client.get('/api/account/me')
    expect(me.status).toBe(200)
    expect(me.body).toMatchObject({ email: 'alma@accounts.test', name: 'Alma Reed', temperatureUnit: 'C', lengthUnit: 'm' })
    expect(me.body.organisations).toEqual([{ slug: 'alma-grid-co', name: 'Alma Grid Co', role: 'owner' }])
  })

  it('refuses a duplicate e-mail, case-insensitively, at the e-mail field', async () => {
    const res = await new ApiClient().post('/api/account/sign-up', {
      name: 'Other', email: 'ALMA@accounts.test', password: 'another long password', organisationName: 'Other Co',
    })
    expect(res.status).toBe(409)
    expect(res.body.data.fieldErrors.email[0]).toMatch(/already exists/)
  })

  it('explains each bad field', async () => {
    const res = await new ApiClient().post('/api/account/sign-up', { name: '', email: 'not-an-address', password: 'short' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fieldErrors).sort()).toEqual(['email', 'name', 'organisationName', 'password'])
    expect(res.body.data.fieldErrors.password[0]).toMatch(/at least 10/)
  })

  it('gives the same answer for a wrong e-mail and a wrong password', async () => {
    const a = new ApiClient()
    const wrongPassword = await a.signIn('alma@accounts.test', 'not the password')
    const b = new ApiClient()
    const wrongEmail = await b.signIn('nobody@accounts.test', 'not the password')
    expect(a.hasSession()).toBe(false)
    expect(b.hasSession()).toBe(false)
    expect(new URL(wrongPassword.body.url).searchParams.get('error')).toBe('CredentialsSignin')
    expect(new URL(wrongEmail.body.url).searchParams.get('error')).toBe('CredentialsSignin')
    expect(wrongPassword.status).toBe(wrongEmail.status)
  })

  it('signs out', async () => {
    const { client } = await signUpOwner('Bo Lind', 'bo@accounts.test', 'Bo Power')
    expect((await client.get('/api/account/me')).status).toBe(200)
    await client.signOut()
    expect((await client.get('/api/account/me')).status).toBe(401)
  })

  it('rate-limits repeated failures per e-mail with HTTP 429 and a clear message', async () => {
    await signUpOwner('Cy Moss', 'cy@accounts.test', 'Cy Energy')
    const c = new ApiClient()
    let last
    for (let i = 0; i < 10; i++) last = await c.signIn('cy@accounts.test', `wrong-${i}`)
    expect(last!.status).not.toBe(429)
    const blocked = await c.signIn('cy@accounts.test', 'correct horse battery')
    expect(blocked.status).toBe(429)
    expect(blocked.body.message).toMatch(/Too many failed sign-in attempts/)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(c.hasSession()).toBe(false)
    // Another account is not affected by this e-mail's failures.
    const other = new ApiClient()
    await other.signIn('alma@accounts.test', 'correct horse battery')
    expect(other.hasSession()).toBe(true)
  })
})

describe('profile and password', () => {
  it('changes name, units and time zone, and rejects a bad time zone at its field', async () => {
    const { client } = await signUpOwner('Dee Park', 'dee@accounts.test', 'Dee Utility')
    const ok = await client.patch('/api/account/me', { name: 'Dee Parker', temperatureUnit: 'F', lengthUnit: 'ft', timeZone: 'America/Chicago' })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ name: 'Dee Parker', temperatureUnit: 'F', lengthUnit: 'ft', timeZone: 'America/Chicago' })
    const bad = await client.patch('/api/account/me', { timeZone: 'Mars/Olympus' })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.timeZone).toBeDefined()
  })

  it('changes the password only with the current one', async () => {
    const { client } = await signUpOwner('Eli Hart', 'eli@accounts.test', 'Eli Lines')
    const wrong = await client.post('/api/account/password', { currentPassword: 'nope', newPassword: 'a brand new password' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.fieldErrors.currentPassword).toBeDefined()
    const ok = await client.post('/api/account/password', { currentPassword: 'correct horse battery', newPassword: 'a brand new password' })
    expect(ok.status).toBe(200)
    const fresh = new ApiClient()
    await fresh.signIn('eli@accounts.test', 'a brand new password')
    expect(fresh.hasSession()).toBe(true)
    expect((await fresh.get('/api/account/me')).status).toBe(200)
  })

  it('ends every session opened before a password change', async () => {
    const { client: laptop } = await signUpOwner('Ivo Kent', 'ivo@accounts.test', 'Ivo Grid')
    const phone = new ApiClient()
    await phone.signIn('ivo@accounts.test', 'correct horse battery')
    expect((await phone.get('/api/account/me')).status).toBe(200)
    await new Promise((r) => setTimeout(r, 1100))
    const changed = await laptop.post('/api/account/password', { currentPassword: 'correct horse battery', newPassword: 'ivo newer password' })
    expect(changed.status).toBe(200)
    const stale = await phone.get('/api/account/me')
    expect(stale.status).toBe(401)
    expect(stale.body.data.message).toMatch(/password was changed/)
    await phone.signIn('ivo@accounts.test', 'ivo newer password')
    expect((await phone.get('/api/account/me')).status).toBe(200)
  })
})

describe('password reset by e-mail', () => {
  it('sends a link that sets a new password once, and says nothing about unknown addresses', async () => {
    await signUpOwner('Fay Quill', 'fay@accounts.test', 'Fay Transmission')
    const anon = new ApiClient()
    const known = await anon.post('/api/account/password-reset', { email: 'fay@accounts.test' })
    const unknown = await anon.post('/api/account/password-reset', { email: 'ghost@accounts.test' })
    expect(known.status).toBe(202)
    expect(unknown.status).toBe(202)
    expect(unknown.body.message.replace('ghost', 'fay')).toBe(known.body.message)
    expect(await mailFor('ghost@accounts.test')).toHaveLength(0)
    const [mail] = await mailFor('fay@accounts.test')
    expect(mail!.subject).toMatch(/Reset your Greybody password/)
    const token = new URL(linkIn(mail!.text, '/reset-password')).searchParams.get('token')!
    const done = await anon.post('/api/account/password-reset/confirm', { token, password: 'fresh password 123' })
    expect(done.status).toBe(200)
    const again = await anon.post('/api/account/password-reset/confirm', { token, password: 'another password 456' })
    expect(again.status).toBe(410)
    expect(again.body.data.message).toMatch(/already been used/)
    const c = new ApiClient()
    await c.signIn('fay@accounts.test', 'fresh password 123')
    expect(c.hasSession()).toBe(true)
  })

  it('refuses an expired link with a clear message', async () => {
    await signUpOwner('Gus Vale', 'gus@accounts.test', 'Gus Networks')
    const anon = new ApiClient()
    await anon.post('/api/account/password-reset', { email: 'gus@accounts.test' })
    const [mail] = await mailFor('gus@accounts.test')
    const token = new URL(linkIn(mail!.text, '/reset-password')).searchParams.get('token')!
    await testDb().updateTable('password_resets').set({ expires_at: new Date(Date.now() - 1000) }).execute()
    const res = await anon.post('/api/account/password-reset/confirm', { token, password: 'fresh password 123' })
    expect(res.status).toBe(410)
    expect(res.body.data.message).toMatch(/expired/)
  })
})
