import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'

beforeAll(resetDatabase)

async function invite(owner: ApiClient, slug: string, email: string, role: string) {
  const res = await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const [mail] = await mailFor(email)
  return { invitation: res.body, token: linkIn(mail!.text, '/invitations/').split('/invitations/')[1]! }
}

describe('invitations', () => {
  it('an invited person creates an account from the link and joins with the invited role', async () => {
    const { client: owner, slug } = await signUpOwner('Ola Berg', 'ola@members.test', 'Ola Utility')
    const { token } = await invite(owner, slug, 'Pia@Members.test', 'thermographer')
    const pending = await owner.get(`/api/orgs/${slug}/invitations`)
    expect(pending.body.map((i: { email: string }) => i.email)).toEqual(['pia@members.test'])

    const anon = new ApiClient()
    const info = await anon.get(`/api/invitations/${token}`)
    expect(info.body).toMatchObject({ organisationName: 'Ola Utility', email: 'pia@members.test', role: 'thermographer', hasAccount: false })
    const signUp = await anon.post('/api/account/sign-up', { name: 'Pia Dahl', email: 'pia@members.test', password: 'pia long password', invitationToken: token })
    expect(signUp.status).toBe(201)
    expect(signUp.body.organisation.slug).toBe(slug)
    await anon.signIn('pia@members.test', 'pia long password')
    const org = await anon.get(`/api/orgs/${slug}`)
    expect(org.body.myRole).toBe('thermographer')
    expect((await owner.get(`/api/orgs/${slug}/invitations`)).body).toEqual([])
    // The link is spent.
    expect((await new ApiClient().get(`/api/invitations/${token}`)).status).toBe(410)
  })

  it('an existing account signs in and accepts; a different account is told it is the wrong one', async () => {
    const { client: owner, slug } = await signUpOwner('Quinn Rowe', 'quinn@members.test', 'Quinn Grid')
    const { client: rae } = await signUpOwner('Rae Soto', 'rae@members.test', 'Rae Contracting')
    const { client: sam } = await signUpOwner('Sam Tell', 'sam@members.test', 'Sam Co')
    const { token } = await invite(owner, slug, 'rae@members.test', 'viewer')
    const wrong = await sam.post(`/api/invitations/${token}/accept`)
    expect(wrong.status).toBe(403)
    expect(wrong.body.data.message).toMatch(/sent to rae@members.test/)
    const ok = await rae.post(`/api/invitations/${token}/accept`)
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ slug, role: 'viewer' })
    // Rae now belongs to two organisations and can switch between them.
    const mine = await rae.get('/api/orgs')
    expect(mine.body.map((o: { name: string }) => o.name).sort()).toEqual(['Quinn Grid', 'Rae Contracting'])
  })

  it('refuses a duplicate pending invitation and an existing member at the e-mail field', async () => {
    const { client: owner, slug } = await signUpOwner('Tia Uhl', 'tia@members.test', 'Tia Power')
    await invite(owner, slug, 'uma@members.test', 'crew')
    const dup = await owner.post(`/api/orgs/${slug}/invitations`, { email: 'uma@members.test', role: 'viewer' })
    expect(dup.status).toBe(409)
    expect(dup.body.data.fieldErrors.email[0]).toMatch(/pending invitation/)
    const self = await owner.post(`/api/orgs/${slug}/invitations`, { email: 'tia@members.test', role: 'viewer' })
    expect(self.status).toBe(409)
    expect(self.body.data.fieldErrors.email[0]).toMatch(/already a member/)
    const badRole = await owner.post(`/api/orgs/${slug}/invitations`, { email: 'x@members.test', role: 'admin' })
    expect(badRole.status).toBe(400)
    expect(badRole.body.data.fieldErrors.role).toBeDefined()
  })

  it('resend replaces the link; revoke withdraws it; expired links say so', async () => {
    const { client: owner, slug } = await signUpOwner('Vic Wade', 'vic@members.test', 'Vic Lines')
    const { invitation, token: first } = await invite(owner, slug, 'wes@members.test', 'crew')
    const resent = await owner.post(`/api/orgs/${slug}/invitations/${invitation.id}/resend`)
    expect(resent.status).toBe(200)
    expect(resent.body.sentCount).toBe(2)
    const [latest] = await mailFor('wes@members.test')
    const second = linkIn(latest!.text, '/invitations/').split('/invitations/')[1]!
    expect(second).not.toBe(first)
    expect((await new ApiClient().get(`/api/invitations/${first}`)).status).toBe(404)
    expect((await new ApiClient().get(`/api/invitations/${second}`)).status).toBe(200)

    await testDb().updateTable('invitations').set({ expires_at: new Date(Date.now() - 60_000) }).where('id', '=', invitation.id).execute()
    const expired = await new ApiClient().get(`/api/invitations/${second}`)
    expect(expired.status).toBe(410)
    expect(expired.body.data.message).toMatch(/expired/)

    const { invitation: other, token: third } = await invite(owner, slug, 'xan@members.test', 'viewer')
    expect((await owner.delete(`/api/orgs/${slug}/invitations/${other.id}`)).status).toBe(200)
    const revoked = await new ApiClient().get(`/api/invitations/${third}`)
    expect(revoked.status).toBe(410)
    expect(revoked.body.data.message).toMatch(/withdrawn/)
  })
})

describe('members', () => {
  it('changes roles, keeps at least one owner, removes members, and tells a removed member why', async () => {
    const { client: owner, slug, userId: ownerId } = await signUpOwner('Yara Zell', 'yara@members.test', 'Yara Energy')
    const { token } = await invite(owner, slug, 'zed@members.test', 'crew')
    const zed = new ApiClient()
    await zed.post('/api/account/sign-up', { name: 'Zed Amos', email: 'zed@members.test', password: 'zed long password', invitationToken: token })
    await zed.signIn('zed@members.test', 'zed long password')
    const members = await owner.get(`/api/orgs/${slug}/members`)
    const zedId = members.body.find((m: { email: string }) => m.email === 'zed@members.test').userId

    const demoteSelf = await owner.patch(`/api/orgs/${slug}/members/${ownerId}`, { role: 'manager' })
    expect(demoteSelf.status).toBe(409)
    expect(demoteSelf.body.data.message).toMatch(/at least one owner/)
    expect((await owner.delete(`/api/orgs/${slug}/members/${ownerId}`)).status).toBe(409)

    const promote = await owner.patch(`/api/orgs/${slug}/members/${zedId}`, { role: 'manager' })
    expect(promote.status).toBe(200)
    expect((await zed.get(`/api/orgs/${slug}`)).body.myRole).toBe('manager')

    expect((await owner.delete(`/api/orgs/${slug}/members/${zedId}`)).status).toBe(204)
    const stale = await zed.get(`/api/orgs/${slug}`)
    expect(stale.status).toBe(403)
    expect(stale.body.data.message).toMatch(/no longer a member of Yara Energy/)
    const after = await owner.get(`/api/orgs/${slug}/members`)
    expect(after.body.map((m: { email: string }) => m.email)).toEqual(['yara@members.test'])
  })

  it('protects organisation settings with optimistic locking', async () => {
    const { client: owner, slug } = await signUpOwner('Abe Cole', 'abe@members.test', 'Abe Utility')
    const org = (await owner.get(`/api/orgs/${slug}`)).body
    const first = await owner.patch(`/api/orgs/${slug}`, { name: 'Abe Utility North', version: org.version })
    expect(first.status).toBe(200)
    const stale = await owner.patch(`/api/orgs/${slug}`, { name: 'Abe Utility South', version: org.version })
    expect(stale.status).toBe(409)
    expect((await owner.get(`/api/orgs/${slug}`)).body.name).toBe('Abe Utility North')
    const bad = await owner.patch(`/api/orgs/${slug}`, { loadExponent: 3, version: first.body.version })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.loadExponent[0]).toMatch(/1.5 to 2.0/)
  })
})
