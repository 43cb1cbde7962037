import { sql } from 'kysely'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, joinByInvitation, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { payCheckout, stripeFake } from '../support/stripe'
import { todayIn } from '../../shared/schedule'

const fake = stripeFake()
const PASSWORD = 'audit password one'

interface Org { owner: ApiClient; slug: string; ownerId: string; orgId: string }
let a: Org
let b: Org
let manager: { client: ApiClient; id: string }
let viewer: { client: ApiClient; id: string }

async function orgIdOf(slug: string) {
  return (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
}

/** Every entry of one action in an organisation's log, read straight from the table (the test connection is '*'). */
async function rows(orgId: string, action: string) {
  return testDb().selectFrom('audit_events').selectAll().where('organisation_id', '=', orgId).where('action', '=', action).orderBy('at').execute()
}

async function accountRows(email: string, action: string) {
  return testDb().selectFrom('account_events').selectAll().where('email', '=', email).where('action', '=', action).orderBy('at').execute()
}

async function auditCount(orgId: string) {
  const r = await testDb().selectFrom('audit_events').select((eb) => eb.fn.countAll<number>().as('n')).where('organisation_id', '=', orgId).executeTakeFirstOrThrow()
  return Number(r.n)
}

beforeAll(async () => {
  await resetDatabase()
  await fake.control('reset')
  const o = await signUpOwner('Ada Owner', 'ada@audit.test', 'Ada Grid', PASSWORD)
  a = { owner: o.client, slug: o.slug, ownerId: o.userId, orgId: await orgIdOf(o.slug) }
  const p = await signUpOwner('Bea Owner', 'bea@audit.test', 'Bea Lines', PASSWORD)
  b = { owner: p.client, slug: p.slug, ownerId: p.userId, orgId: await orgIdOf(p.slug) }
  manager = await joinByInvitation(a.owner, a.slug, 'mo@audit.test', 'manager', 'Mo Manager', PASSWORD)
  viewer = await joinByInvitation(a.owner, a.slug, 'vi@audit.test', 'viewer', 'Vi Viewer', PASSWORD)
}, 60_000)

describe('sign-ins', () => {
  it('records a successful sign-in once in each of the person’s organisations and on their account, with address and browser', async () => {
    const before = (await rows(a.orgId, 'account.signed_in')).filter((r) => r.actor_id === manager.id).length
    const c = new ApiClient()
    await c.signIn('mo@audit.test', PASSWORD)
    expect(c.hasSession()).toBe(true)
    const mine = (await rows(a.orgId, 'account.signed_in')).filter((r) => r.actor_id === manager.id)
    expect(mine).toHaveLength(before + 1)
    const last = mine.at(-1)!
    expect(last).toMatchObject({ actor_label: 'Mo Manager <mo@audit.test>', target_kind: 'user', target_id: manager.id })
    expect(last.ip).toMatch(/127\.0\.0\.1/)
    expect(last.user_agent).toBeTruthy()
    // Mo belongs to Ada Grid only: Bea Lines's log has nothing of Mo's.
    expect((await rows(b.orgId, 'account.signed_in')).filter((r) => r.actor_id === manager.id)).toHaveLength(0)
    expect((await accountRows('mo@audit.test', 'account.signed_in')).length).toBe(before + 1)
  })

  it('records a refused sign-in against the person whose address was typed, naming no actor', async () => {
    const c = new ApiClient()
    await c.signIn('mo@audit.test', 'not the password')
    expect(c.hasSession()).toBe(false)
    const failed = await rows(a.orgId, 'account.sign_in_failed')
    expect(failed).toHaveLength(1)
    expect(failed[0]).toMatchObject({ actor_id: null, target_kind: 'user', target_id: manager.id, details: { email: 'mo@audit.test' } })
    expect(failed[0]!.ip).toMatch(/127\.0\.0\.1/)
    const own = await accountRows('mo@audit.test', 'account.sign_in_failed')
    expect(own).toHaveLength(1)
    expect(own[0]!.user_id).toBe(manager.id)
  })

  it('keeps a refused sign-in with an unknown address on no organisation’s log', async () => {
    const total = await auditCount(a.orgId) + await auditCount(b.orgId)
    await new ApiClient().signIn('nobody@audit.test', 'whatever it is')
    const own = await accountRows('nobody@audit.test', 'account.sign_in_failed')
    expect(own).toHaveLength(1)
    expect(own[0]!.user_id).toBeNull()
    expect(await auditCount(a.orgId) + await auditCount(b.orgId)).toBe(total)
  })

  it('shows a person their own sign-ins and sign-outs on their account, and nobody else’s', async () => {
    const c = new ApiClient()
    await c.signIn('vi@audit.test', PASSWORD)
    await c.signOut()
    await c.signIn('vi@audit.test', PASSWORD)
    const res = await c.get('/api/account/events?pageSize=50')
    expect(res.status).toBe(200)
    const actions = (res.body.items as Array<{ action: string }>).map((e) => e.action)
    // Newest first: sign-in, sign-out, sign-in, and the sign-in after joining.
    expect(actions.slice(0, 3)).toEqual(['account.signed_in', 'account.signed_out', 'account.signed_in'])
    expect(res.body.items[0].ip).toMatch(/127\.0\.0\.1/)
    expect(JSON.stringify(res.body)).not.toContain('mo@audit.test')
    // A sign-out stays on the person's own account only.
    expect(await rows(a.orgId, 'account.signed_out')).toHaveLength(0)
    expect((await new ApiClient().get('/api/account/events')).status).toBe(401)
  })
})

describe('members and invitations', () => {
  it('records invitations sent, withdrawn and accepted', async () => {
    // From the set-up: Mo and Vi were invited and joined.
    const invited = await rows(a.orgId, 'member.invited')
    expect(invited.map((r) => [r.target_label, r.details.role, r.actor_id])).toEqual([['mo@audit.test', 'manager', a.ownerId], ['vi@audit.test', 'viewer', a.ownerId]])
    const joined = await rows(a.orgId, 'member.joined')
    expect(joined.map((r) => [r.actor_id, r.details.role])).toEqual([[manager.id, 'manager'], [viewer.id, 'viewer']])

    const inv = await a.owner.post(`/api/orgs/${a.slug}/invitations`, { email: 'cy@audit.test', role: 'crew' })
    expect(inv.status).toBe(201)
    expect((await a.owner.delete(`/api/orgs/${a.slug}/invitations/${inv.body.id}`)).status).toBe(200)
    // Withdrawing it again is refused and records nothing.
    expect((await a.owner.delete(`/api/orgs/${a.slug}/invitations/${inv.body.id}`)).status).toBe(404)
    const revoked = await rows(a.orgId, 'member.invitation_revoked')
    expect(revoked).toHaveLength(1)
    expect(revoked[0]).toMatchObject({ target_kind: 'invitation', target_id: inv.body.id, target_label: 'cy@audit.test', actor_id: a.ownerId })
  })

  it('records a role change with the old and new role, and an ownership change as such', async () => {
    expect((await a.owner.patch(`/api/orgs/${a.slug}/members/${viewer.id}`, { role: 'thermographer' })).status).toBe(200)
    expect((await a.owner.patch(`/api/orgs/${a.slug}/members/${manager.id}`, { role: 'owner' })).status).toBe(200)
    expect((await a.owner.patch(`/api/orgs/${a.slug}/members/${manager.id}`, { role: 'manager' })).status).toBe(200)
    const changed = await rows(a.orgId, 'member.role_changed')
    expect(changed.map((r) => [r.target_id, r.details])).toEqual([
      [viewer.id, { from: 'viewer', to: 'thermographer' }],
      [manager.id, { from: 'manager', to: 'owner', ownership: 'granted' }],
      [manager.id, { from: 'owner', to: 'manager', ownership: 'given_up' }],
    ])
    expect(changed.every((r) => r.actor_id === a.ownerId && r.actor_label === 'Ada Owner <ada@audit.test>')).toBe(true)
  })

  it('records nothing for a refused change: the last owner cannot step down, a role set to itself changes nothing', async () => {
    const before = await auditCount(a.orgId)
    const refused = await a.owner.patch(`/api/orgs/${a.slug}/members/${a.ownerId}`, { role: 'manager' })
    expect(refused.status).toBe(409)
    expect((await a.owner.delete(`/api/orgs/${a.slug}/members/${a.ownerId}`)).status).toBe(409)
    expect((await a.owner.patch(`/api/orgs/${a.slug}/members/${manager.id}`, { role: 'manager' })).status).toBe(200)
    // A manager may not change roles at all (403), and is not recorded as having done so.
    expect((await manager.client.patch(`/api/orgs/${a.slug}/members/${viewer.id}`, { role: 'crew' })).status).toBe(403)
    expect(await auditCount(a.orgId)).toBe(before)
  })

  it('records a removal with the role the person had', async () => {
    const gone = await joinByInvitation(a.owner, a.slug, 'rem@audit.test', 'crew', 'Rem Crew', PASSWORD)
    expect((await a.owner.delete(`/api/orgs/${a.slug}/members/${gone.id}`)).status).toBe(204)
    const removed = await rows(a.orgId, 'member.removed')
    expect(removed).toHaveLength(1)
    expect(removed[0]).toMatchObject({ target_id: gone.id, target_label: 'Rem Crew <rem@audit.test>', details: { role: 'crew' }, actor_id: a.ownerId })
    // A second removal finds no member and records nothing.
    expect((await a.owner.delete(`/api/orgs/${a.slug}/members/${gone.id}`)).status).toBe(404)
    expect(await rows(a.orgId, 'member.removed')).toHaveLength(1)
  })
})

describe('settings, tokens, archives and passwords', () => {
  it('records a settings change field by field, and nothing for a stale form', async () => {
    const org = (await a.owner.get(`/api/orgs/${a.slug}`)).body
    expect((await a.owner.patch(`/api/orgs/${a.slug}`, { name: 'Ada Grid Ltd', loadExponent: 1.8, version: org.version })).status).toBe(200)
    expect((await a.owner.patch(`/api/orgs/${a.slug}`, { name: 'Stale', version: org.version })).status).toBe(409)
    const changed = await rows(a.orgId, 'organisation.settings_changed')
    expect(changed).toHaveLength(1)
    expect(changed[0]!.details).toEqual({ changes: { name: { from: 'Ada Grid', to: 'Ada Grid Ltd' }, loadExponent: { from: Number(org.loadExponent), to: 1.8 } } })
  })

  it('records an API token created and revoked, once each', async () => {
    const created = await a.owner.post(`/api/orgs/${a.slug}/api-tokens`, { name: 'Asset sync', scope: 'read' })
    expect(created.status).toBe(201)
    const id = created.body.token.id
    expect((await a.owner.post(`/api/orgs/${a.slug}/api-tokens/${id}/revoke`)).status).toBe(200)
    expect((await a.owner.post(`/api/orgs/${a.slug}/api-tokens/${id}/revoke`)).status).toBe(200)
    const made = await rows(a.orgId, 'token.created')
    expect(made).toHaveLength(1)
    expect(made[0]).toMatchObject({ target_kind: 'api_token', target_id: id, target_label: 'Asset sync', details: { scope: 'read', hint: created.body.token.hint } })
    // The secret is never written to the log.
    expect(JSON.stringify(made[0])).not.toContain(created.body.secret)
    const revoked = await rows(a.orgId, 'token.revoked')
    expect(revoked).toHaveLength(1)
    expect(revoked[0]).toMatchObject({ target_id: id, actor_id: a.ownerId })
  })

  it('records archiving and restoring a site (with its assets), and nothing for a stale archive', async () => {
    const site = await a.owner.post(`/api/orgs/${a.slug}/sites`, { code: 'AG-01', name: 'Ashby Cross', kind: 'substation', latitude: 52.1, longitude: -1.2 })
    expect(site.status).toBe(201)
    for (const label of ['T1', 'CB1']) expect((await a.owner.post(`/api/orgs/${a.slug}/assets`, { siteId: site.body.id, label, assetClass: 'breaker' })).status).toBe(201)
    const archived = await manager.client.post(`/api/orgs/${a.slug}/sites/${site.body.id}/archive`, { version: site.body.version })
    expect(archived.status).toBe(200)
    expect((await manager.client.post(`/api/orgs/${a.slug}/sites/${site.body.id}/archive`, { version: site.body.version })).status).toBe(409)
    const restored = await a.owner.post(`/api/orgs/${a.slug}/sites/${site.body.id}/unarchive`, { version: archived.body.version })
    expect(restored.status).toBe(200)
    const arch = await rows(a.orgId, 'site.archived')
    expect(arch).toHaveLength(1)
    expect(arch[0]).toMatchObject({ actor_id: manager.id, target_kind: 'site', target_id: site.body.id, target_label: 'AG-01 · Ashby Cross', details: { assets: 2 } })
    const back = await rows(a.orgId, 'site.restored')
    expect(back).toHaveLength(1)
    expect(back[0]).toMatchObject({ actor_id: a.ownerId, details: { assets: 2 } })
  })

  it('records a password change in each of the person’s organisations, and nothing for a wrong current password', async () => {
    const c = new ApiClient()
    await c.signIn('vi@audit.test', PASSWORD)
    expect((await c.post('/api/account/password', { currentPassword: 'wrong one here', newPassword: 'audit password two' })).status).toBe(400)
    expect(await rows(a.orgId, 'account.password_changed')).toHaveLength(0)
    expect((await c.post('/api/account/password', { currentPassword: PASSWORD, newPassword: 'audit password two' })).status).toBe(200)
    const changed = await rows(a.orgId, 'account.password_changed')
    expect(changed).toHaveLength(1)
    expect(changed[0]).toMatchObject({ actor_id: viewer.id, target_id: viewer.id })
    expect(await accountRows('vi@audit.test', 'account.password_changed')).toHaveLength(1)
  })
})

describe('billing through the payment provider', () => {
  it('records the checkout the owner opened, the subscription it started and the invoice paid, once each', async () => {
    const checkout = await b.owner.post(`/api/orgs/${b.slug}/billing/checkout`, { plan: 'programme', interval: 'month', seats: 3 })
    expect(checkout.status).toBe(201)
    await payCheckout(checkout.body.url)
    await fake.deliveries()
    // The page comes back and syncs the same subscription: nothing new to record.
    expect((await b.owner.get(`/api/orgs/${b.slug}/billing?checkout=done&session=${checkout.body.sessionId}`)).status).toBe(200)

    const opened = await rows(b.orgId, 'billing.checkout_started')
    expect(opened).toHaveLength(1)
    expect(opened[0]).toMatchObject({ actor_id: b.ownerId, details: { plan: 'programme', interval: 'month', seats: 3, session: checkout.body.sessionId } })
    const changed = await rows(b.orgId, 'billing.subscription_changed')
    expect(changed).toHaveLength(1)
    expect(changed[0]!.details).toEqual({ changes: {
      plan: { from: 'trial', to: 'programme' }, interval: { from: null, to: 'month' }, status: { from: 'trialing', to: 'active' }, seats: { from: 10, to: 3 },
    } })
    const paid = await rows(b.orgId, 'billing.invoice_paid')
    expect(paid).toHaveLength(1)
    // 3 seats × 39.00 USD = 117.00 USD (the Programme plan's monthly seat price, shared/billing/plans.ts)
    expect(paid[0]!.details).toMatchObject({ amount: 11700, currency: 'usd' })
  })

  it('records a seat change by the owner and its effect on the subscription', async () => {
    const res = await b.owner.post(`/api/orgs/${b.slug}/billing/seats`, { seats: 4 })
    expect(res.status).toBe(200)
    await fake.deliveries()
    const seats = await rows(b.orgId, 'billing.seats_changed')
    expect(seats).toHaveLength(1)
    expect(seats[0]).toMatchObject({ actor_id: b.ownerId, details: { from: 3, to: 4 } })
    const changed = await rows(b.orgId, 'billing.subscription_changed')
    expect(changed).toHaveLength(2)
    expect(changed[1]!.details).toEqual({ changes: { seats: { from: 3, to: 4 } } })
    // Going below the seats in use is refused and records nothing.
    expect((await b.owner.post(`/api/orgs/${b.slug}/billing/seats`, { seats: 0 })).status).toBe(400)
    expect(await rows(b.orgId, 'billing.seats_changed')).toHaveLength(1)
  })

  it('records a failed renewal payment from the provider’s webhook, with no person as actor', async () => {
    await fake.control('fail-next-payment?count=1')
    await fake.control('advance?days=32')
    await fake.deliveries()
    const failed = await rows(b.orgId, 'billing.invoice_payment_failed')
    expect(failed).toHaveLength(1)
    expect(failed[0]).toMatchObject({ actor_id: null, actor_label: 'Payment provider', target_kind: 'invoice' })
    // 4 seats × 39.00 USD = 156.00 USD due
    expect(failed[0]!.details).toMatchObject({ amount: 15600, currency: 'usd' })
    const lapsed = (await rows(b.orgId, 'billing.subscription_changed')).at(-1)!
    expect(lapsed.details).toMatchObject({ changes: { status: { from: 'active', to: 'past_due' } } })
  })
})

describe('the audit log page’s API', () => {
  it('lists the organisation’s entries newest first, paged on the server, with a summary of each', async () => {
    const total = await auditCount(a.orgId)
    const first = await a.owner.get(`/api/orgs/${a.slug}/audit?pageSize=5`)
    expect(first.status).toBe(200)
    expect(first.body.total).toBe(total)
    expect(first.body.items).toHaveLength(5)
    const second = await a.owner.get(`/api/orgs/${a.slug}/audit?pageSize=5&page=2`)
    const ats = [...first.body.items, ...second.body.items].map((e: { at: string }) => e.at)
    expect([...ats].sort().reverse()).toEqual(ats)
    expect(new Set([...first.body.items, ...second.body.items].map((e: { id: string }) => e.id)).size).toBe(10)
    const all = (await a.owner.get(`/api/orgs/${a.slug}/audit?pageSize=100`)).body.items as Array<{ action: string; summary: string }>
    expect(all.find((e) => e.action === 'member.role_changed')!.summary).toBe('Changed Mo Manager <mo@audit.test> from owner to manager.')
  })

  it('filters by kind (a group or one action), by person (acting or acted on) and by day', async () => {
    const members = (await a.owner.get(`/api/orgs/${a.slug}/audit?kind=members&pageSize=100`)).body
    expect(members.items.length).toBeGreaterThan(0)
    expect(members.items.every((e: { group: string }) => e.group === 'members')).toBe(true)
    const roles = (await a.owner.get(`/api/orgs/${a.slug}/audit?kind=member.role_changed`)).body
    expect(roles.total).toBe(3)
    // Mo: the role changes made to Mo, Mo's own sign-ins and archive, the refused sign-in against Mo.
    const mo = (await a.owner.get(`/api/orgs/${a.slug}/audit?personId=${manager.id}&pageSize=100`)).body.items as Array<{ actor: { id: string } | null; target: { id: string } | null }>
    expect(mo.length).toBe((await testDb().selectFrom('audit_events').select('id').where('organisation_id', '=', a.orgId)
      .where((eb) => eb.or([eb('actor_id', '=', manager.id), eb.and([eb('target_kind', '=', 'user'), eb('target_id', '=', manager.id)])])).execute()).length)
    expect(mo.every((e) => e.actor?.id === manager.id || e.target?.id === manager.id)).toBe(true)
    const today = todayIn('UTC')
    expect((await a.owner.get(`/api/orgs/${a.slug}/audit?from=${today}&to=${today}`)).body.total).toBe(await auditCount(a.orgId))
    expect((await a.owner.get(`/api/orgs/${a.slug}/audit?from=2099-01-01`)).body.total).toBe(0)
    expect((await a.owner.get(`/api/orgs/${a.slug}/audit?to=2000-01-01`)).body.total).toBe(0)
  })

  it('refuses bad filters with a field message', async () => {
    const backwards = await a.owner.get(`/api/orgs/${a.slug}/audit?from=2026-12-05&to=2026-12-01`)
    expect(backwards.status).toBe(400)
    expect(backwards.body.data.fieldErrors.to).toEqual(['The end date must not be before the start date.'])
    const kind = await a.owner.get(`/api/orgs/${a.slug}/audit?kind=everything.deleted`)
    expect(kind.status).toBe(400)
    expect(kind.body.data.fieldErrors.kind).toBeTruthy()
    expect((await a.owner.get(`/api/orgs/${a.slug}/audit?personId=not-a-uuid`)).status).toBe(400)
  })

  it('is for owners only', async () => {
    // Vi changed their password above (which ended Vi's older sessions) and is a thermographer now.
    const vi = new ApiClient()
    await vi.signIn('vi@audit.test', 'audit password two')
    for (const c of [manager.client, vi]) {
      const res = await c.get(`/api/orgs/${a.slug}/audit`)
      expect(res.status).toBe(403)
      expect(res.body.data.message).toMatch(/does not allow/)
    }
  })

  it('shows another organisation’s owner none of these entries', async () => {
    expect((await b.owner.get(`/api/orgs/${a.slug}/audit`)).status).toBe(404)
    const own = await b.owner.get(`/api/orgs/${b.slug}/audit?pageSize=100`)
    expect(own.status).toBe(200)
    expect(own.body.total).toBe(await auditCount(b.orgId))
    for (const leak of ['mo@audit.test', 'vi@audit.test', 'ada@audit.test', 'Ada Grid', a.orgId, manager.id]) expect(JSON.stringify(own.body)).not.toContain(leak)
    // A person of the other organisation as the filter finds nothing here.
    expect((await b.owner.get(`/api/orgs/${b.slug}/audit?personId=${manager.id}`)).body.total).toBe(0)
  })
})

describe('append-only', () => {
  it('refuses UPDATE and DELETE on both tables, even for a system connection', async () => {
    const db = testDb()
    await expect(sql`update audit_events set action = 'site.restored' where organisation_id = ${a.orgId}`.execute(db)).rejects.toThrow(/append-only/)
    await expect(sql`delete from audit_events where organisation_id = ${a.orgId}`.execute(db)).rejects.toThrow(/append-only/)
    await expect(sql`update account_events set ip = '10.0.0.1'`.execute(db)).rejects.toThrow(/append-only/)
    await expect(sql`delete from account_events where user_id is not null`.execute(db)).rejects.toThrow(/append-only/)
    expect(await auditCount(a.orgId)).toBeGreaterThan(10)
  })

  it('lets the entries go only together with their organisation', async () => {
    const o = await signUpOwner('Gil Gone', 'gil@audit.test', 'Gil Gone Power', PASSWORD)
    const id = await orgIdOf(o.slug)
    expect(await auditCount(id)).toBeGreaterThan(0)
    await sql`delete from organisations where id = ${id}`.execute(testDb())
    expect(await auditCount(id)).toBe(0)
  })

  it('keeps the tenant wall: a connection set to one organisation sees none of another’s entries', async () => {
    const seen = await testDb().connection().execute(async (conn) => {
      await sql`select set_config('greybody.org', ${b.orgId}, false)`.execute(conn)
      try {
        return (await sql<{ n: number }>`select count(*)::int as n from audit_events where organisation_id = ${a.orgId}`.execute(conn)).rows[0]!.n
      } finally {
        await sql`select set_config('greybody.org', '*', false)`.execute(conn)
      }
    })
    expect(seen).toBe(0)
  })
})
