import { readFileSync } from 'node:fs'
import path from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { inject } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { ROOT } from '../support/env'
import { ORG_ROUTES } from '../support/org-routes'
import { payCheckout, postWebhook, stripeFake } from '../support/stripe'
import { GRACE_DAYS, TRIAL_DAYS, TRIAL_SEATS } from '../../shared/billing/plans'
import { can } from '../../shared/permissions'

const DAY = 86_400_000
const fake = stripeFake()
const baseUrl = () => inject('baseUrl')

beforeAll(async () => {
  await resetDatabase()
  await fake.control('reset')
})

async function orgId(slug: string) {
  const row = await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()
  return row.id
}

async function billingRow(slug: string) {
  return testDb().selectFrom('organisation_billing').selectAll().where('organisation_id', '=', await orgId(slug)).executeTakeFirstOrThrow()
}

/** Invites someone, who signs up from the e-mailed link; returns their signed-in client. */
async function join(owner: ApiClient, slug: string, email: string, role: string) {
  const res = await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  const signUp = await c.post('/api/account/sign-up', { name: email.split('@')[0], email, password: 'billing password', invitationToken: token })
  expect(signUp.status, JSON.stringify(signUp.body)).toBe(201)
  await c.signIn(email, 'billing password')
  return c
}

/** Signs up an owner and subscribes through the fake's Checkout page. */
async function subscribed(prefix: string, seats: number, plan = 'programme', interval = 'month') {
  const o = await signUpOwner(`${prefix} Owner`, `${prefix}-owner@billing.test`, `${prefix} Power`)
  const checkout = await o.client.post(`/api/orgs/${o.slug}/billing/checkout`, { plan, interval, seats })
  expect(checkout.status, JSON.stringify(checkout.body)).toBe(201)
  const back = await payCheckout(checkout.body.url)
  return { ...o, back, sessionId: checkout.body.sessionId as string }
}

describe('trial', () => {
  it(`starts every new organisation on a ${TRIAL_DAYS}-day trial with ${TRIAL_SEATS} seats`, async () => {
    const { client, slug } = await signUpOwner('Tess Trial', 'tess@billing.test', 'Tess Grid')
    const res = await client.get(`/api/orgs/${slug}/billing`)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ plan: { key: 'trial' }, status: 'trialing', canSubscribe: true, subscribed: false, hasCustomer: false })
    expect(res.body.seats).toEqual({ paid: TRIAL_SEATS, used: 1, members: 1, pending: 0, free: TRIAL_SEATS - 1 })
    expect(res.body.standing).toMatchObject({ state: 'trial', readOnly: false })
    const ends = new Date(res.body.standing.trialEndsAt).getTime()
    expect(Math.abs(ends - (Date.now() + TRIAL_DAYS * DAY))).toBeLessThan(60_000)
    expect((await client.get(`/api/orgs/${slug}/billing/invoices`)).body).toMatchObject({ items: [], total: 0, page: 1 })
  })

  it('counts pending invitations for editing roles as seats and refuses the one beyond the trial seats', async () => {
    const { client, slug } = await signUpOwner('Uli Seats', 'uli@billing.test', 'Uli Lines')
    for (let i = 1; i < TRIAL_SEATS; i++) {
      const res = await client.post(`/api/orgs/${slug}/invitations`, { email: `uli-${i}@billing.test`, role: i % 2 ? 'crew' : 'thermographer' })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
    }
    // Viewers are free, however many.
    expect((await client.post(`/api/orgs/${slug}/invitations`, { email: 'uli-viewer@billing.test', role: 'viewer' })).status).toBe(201)
    const refused = await client.post(`/api/orgs/${slug}/invitations`, { email: 'uli-extra@billing.test', role: 'manager' })
    expect(refused.status).toBe(402)
    expect(refused.body.data.message).toMatch(new RegExp(`All ${TRIAL_SEATS} seats of Uli Lines are taken \\(1 member with an editing role and ${TRIAL_SEATS - 1} pending invitations`))
    expect(refused.body.data.message).toMatch(/trial includes 10 seats: choose a plan/)
    const pending = (await client.get(`/api/orgs/${slug}/invitations`)).body as Array<{ email: string }>
    expect(pending.map((i) => i.email)).not.toContain('uli-extra@billing.test')
    // Withdrawing an invitation frees its seat.
    const first = pending.find((i) => i.email === 'uli-1@billing.test') as unknown as { id: string }
    expect((await client.delete(`/api/orgs/${slug}/invitations/${first.id}`)).status).toBe(200)
    expect((await client.post(`/api/orgs/${slug}/invitations`, { email: 'uli-extra@billing.test', role: 'manager' })).status).toBe(201)
  })

  it('gives grace when the trial ends, then turns read-only', async () => {
    const { client, slug } = await signUpOwner('Vera Lapse', 'vera@billing.test', 'Vera Works')
    const id = await orgId(slug)
    await testDb().updateTable('organisation_billing').set({ trial_ends_at: new Date(Date.now() - DAY) }).where('organisation_id', '=', id).execute()
    const grace = (await client.get(`/api/orgs/${slug}/billing/standing`)).body
    expect(grace).toMatchObject({ state: 'grace', reason: 'trial_ended', readOnly: false, canManage: true })
    // trial end + GRACE_DAYS
    expect(Math.abs(new Date(grace.graceUntil).getTime() - (Date.now() - DAY + GRACE_DAYS * DAY))).toBeLessThan(60_000)
    expect((await client.patch(`/api/orgs/${slug}`, { name: 'Vera Works Ltd', version: 1 })).status).toBe(200)

    await testDb().updateTable('organisation_billing').set({ trial_ends_at: new Date(Date.now() - (GRACE_DAYS + 1) * DAY) }).where('organisation_id', '=', id).execute()
    expect((await client.get(`/api/orgs/${slug}/billing/standing`)).body).toMatchObject({ state: 'read_only', reason: 'trial_ended', readOnly: true })
    const refused = await client.patch(`/api/orgs/${slug}`, { name: 'Vera Works plc', version: 2 })
    expect(refused.status).toBe(402)
    expect(refused.body.data.message).toMatch(/Vera Works Ltd is read-only because its trial has ended\. Everything is kept/)
  })
})

describe('subscribing', () => {
  let owner: Awaited<ReturnType<typeof subscribed>>

  beforeAll(async () => {
    owner = await subscribed('wren', 3)
  })

  it('goes through Checkout and comes back to the billing page with the subscription active', async () => {
    expect(owner.back).toBe(`${baseUrl()}/orgs/${owner.slug}/billing?checkout=done&session=${owner.sessionId}`)
    // The fake delivers the webhooks before redirecting, so the state is there without the session id…
    const res = await owner.client.get(`/api/orgs/${owner.slug}/billing`)
    expect(res.body).toMatchObject({ plan: { key: 'programme', name: 'Programme' }, interval: 'month', status: 'active', subscribed: true, canSubscribe: false, hasCustomer: true, cancelAtPeriodEnd: false })
    expect(res.body.seats).toMatchObject({ paid: 3, used: 1, free: 2 })
    // 3 seats × 39.00 = 117.00 per month: common practice (per-seat price × seats)
    expect(res.body.periodTotal).toEqual({ amount: 11700, currency: 'usd' })
    expect(res.body.standing.state).toBe('active')
    const renews = new Date(res.body.currentPeriodEnd).getTime()
    expect(renews).toBeGreaterThan(Date.now() + 27 * DAY)
    expect(renews).toBeLessThan(Date.now() + 32 * DAY)
    // …and the return URL's session id is confirmed with the provider as well.
    const confirmed = await owner.client.get(`/api/orgs/${owner.slug}/billing?checkoutSession=${owner.sessionId}`)
    expect(confirmed.body.checkout).toEqual({ status: 'complete' })
    const invoices = await owner.client.get(`/api/orgs/${owner.slug}/billing/invoices`)
    expect(invoices.body.total).toBe(1)
    expect(invoices.body.items[0]).toMatchObject({ status: 'paid', reason: 'subscription_create', total: { amount: 11700, currency: 'usd' }, amountPaid: { amount: 11700, currency: 'usd' } })
    expect(invoices.body.items[0].hostedUrl).toMatch(new RegExp(`^${fake.url}/invoices/in_`))
    // The provider's subscription carries the organisation, for events that arrive before the checkout's.
    const row = await billingRow(owner.slug)
    const sub = await fake.sdk.subscriptions.retrieve(row.stripe_subscription_id!)
    expect(sub.metadata.organisation_id).toBe(row.organisation_id)
    expect(sub.items.data[0]!.quantity).toBe(3)
  })

  it('refuses a second checkout while subscribed, and a checkout below the seats in use', async () => {
    const again = await owner.client.post(`/api/orgs/${owner.slug}/billing/checkout`, { plan: 'utility', interval: 'year', seats: 3 })
    expect(again.status).toBe(409)
    expect(again.body.data.message).toMatch(/already has a subscription/)
    const { client, slug } = await signUpOwner('Xia Few', 'xia@billing.test', 'Xia Utility')
    await client.post(`/api/orgs/${slug}/invitations`, { email: 'xia-1@billing.test', role: 'crew' })
    const few = await client.post(`/api/orgs/${slug}/billing/checkout`, { plan: 'programme', interval: 'month', seats: 1 })
    expect(few.status).toBe(409)
    expect(few.body.data.fieldErrors.seats[0]).toMatch(/2 seats are in use/)
    const bad = await client.post(`/api/orgs/${slug}/billing/checkout`, { plan: 'trial', interval: 'week', seats: 0 })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['interval', 'plan', 'seats'])
  })

  it('enforces the seats: the owner adds one (prorated, invoiced at once) and the invitation then goes through', async () => {
    const { client, slug } = owner
    await join(client, slug, 'wren-thermo@billing.test', 'thermographer')
    await client.post(`/api/orgs/${slug}/invitations`, { email: 'wren-crew@billing.test', role: 'crew' })
    expect((await client.post(`/api/orgs/${slug}/invitations`, { email: 'wren-viewer@billing.test', role: 'viewer' })).status).toBe(201)
    const refused = await client.post(`/api/orgs/${slug}/invitations`, { email: 'wren-manager@billing.test', role: 'manager' })
    expect(refused.status).toBe(402)
    expect(refused.body.data.message).toMatch(/All 3 seats of wren Power are taken \(2 members with an editing role and 1 pending invitation for one\)\. A manager needs a seat\. Add 1 seat/)
    expect(refused.body.data.seats).toEqual({ paid: 3, used: 3, short: 1 })

    const below = await client.post(`/api/orgs/${slug}/billing/seats`, { seats: 2 })
    expect(below.status).toBe(409)
    expect(below.body.data.fieldErrors.seats[0]).toMatch(/3 seats are in use/)

    const added = await client.post(`/api/orgs/${slug}/billing/seats`, { seats: 4 })
    expect(added.status, JSON.stringify(added.body)).toBe(200)
    expect(added.body.summary.seats).toMatchObject({ paid: 4, used: 3, free: 1 })
    // One seat for (almost) the whole month: at most 39.00, less only by the seconds elapsed since subscribing.
    // Common practice: time-proportional proration.
    expect(added.body.prorationInvoice.total).toBeLessThanOrEqual(3900)
    expect(added.body.prorationInvoice.total).toBeGreaterThan(3900 - 10)
    const sub = await fake.sdk.subscriptions.retrieve((await billingRow(slug)).stripe_subscription_id!)
    expect(sub.items.data[0]!.quantity).toBe(4)
    const invoices = (await client.get(`/api/orgs/${slug}/billing/invoices`)).body
    expect(invoices.items.map((i: { reason: string }) => i.reason)).toEqual(['subscription_update', 'subscription_create'])
    expect(invoices.items[0].status).toBe('paid')

    expect((await client.post(`/api/orgs/${slug}/invitations`, { email: 'wren-manager@billing.test', role: 'manager' })).status).toBe(201)
  })

  it('checks seats when a viewer is given an editing role, and when an invitation is accepted after seats were cut', async () => {
    const { client, slug } = owner
    // 4 seats: owner, thermographer, pending crew, pending manager. A viewer joins (free), then cannot be made crew.
    const viewer = await join(client, slug, 'wren-viewer2@billing.test', 'viewer')
    const members = (await client.get(`/api/orgs/${slug}/members`)).body as Array<{ email: string; userId: string }>
    const viewerId = members.find((m) => m.email === 'wren-viewer2@billing.test')!.userId
    const promote = await client.patch(`/api/orgs/${slug}/members/${viewerId}`, { role: 'crew' })
    expect(promote.status).toBe(402)
    expect(promote.body.data.message).toMatch(/A crew member needs a seat/)
    expect((await viewer.get(`/api/orgs/${slug}`)).body.myRole).toBe('viewer')

    // Seats cut below use outside the app (e.g. in the provider's dashboard): the invited person is told plainly.
    await testDb().updateTable('organisation_billing').set({ seats_paid: 2 }).where('organisation_id', '=', await orgId(slug)).execute()
    const [mail] = await mailFor('wren-crew@billing.test')
    const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
    const late = await new ApiClient().post('/api/account/sign-up', { name: 'Wren Crew', email: 'wren-crew@billing.test', password: 'billing password', invitationToken: token })
    expect(late.status).toBe(402)
    expect(late.body.data.message).toMatch(/All 2 seats of wren Power are taken \(2 members with an editing role\)\. A crew member needs a seat\. Ask one of its owners to add a seat, then open this link again\./)
    // Nothing was created: the account can still be made from the same link once a seat is free.
    expect(await testDb().selectFrom('users').select('id').where('email', '=', 'wren-crew@billing.test').executeTakeFirst()).toBeUndefined()
    await testDb().updateTable('organisation_billing').set({ seats_paid: 4 }).where('organisation_id', '=', await orgId(slug)).execute()
    expect((await new ApiClient().post('/api/account/sign-up', { name: 'Wren Crew', email: 'wren-crew@billing.test', password: 'billing password', invitationToken: token })).status).toBe(201)
  })
})

describe('webhooks', () => {
  let owner: Awaited<ReturnType<typeof subscribed>>

  beforeAll(async () => {
    owner = await subscribed('yara', 2)
  })

  it('refuses a bad signature, a tampered body and a missing header with 400, recording nothing', async () => {
    const before = await testDb().selectFrom('stripe_events').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    const payload = JSON.stringify({ id: 'evt_forged_1', object: 'event', type: 'customer.subscription.deleted', created: Math.floor(Date.now() / 1000), data: { object: { id: 'sub_x' } } })
    const wrongSecret = await postWebhook(baseUrl(), payload, 'whsec_not_ours')
    expect(wrongSecret.status).toBe(400)
    expect(wrongSecret.body.data.message).toMatch(/signature does not match/)
    const signedOther = (await import('stripe')).default.webhooks.generateTestHeaderString({ payload: '{"id":"evt_other"}', secret: fake.secret })
    expect((await postWebhook(baseUrl(), payload, fake.secret, { signature: signedOther })).status).toBe(400)
    const missing = await fetch(`${baseUrl()}/api/stripe/webhook`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: payload })
    expect(missing.status).toBe(400)
    const after = await testDb().selectFrom('stripe_events').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    expect(Number(after.n)).toBe(Number(before.n))
  })

  it('records each event once: a replay answers "duplicate" and changes nothing', async () => {
    const row = await billingRow(owner.slug)
    // The subscription as created had 2 seats; raise it to 3, then replay the creation event.
    expect((await owner.client.post(`/api/orgs/${owner.slug}/billing/seats`, { seats: 3 })).status).toBe(200)
    await fake.deliveries()
    const events = await fake.sdk.events.list({ type: 'customer.subscription.created', limit: 100 })
    const created = events.data.find((e) => (e.data.object as { id: string }).id === row.stripe_subscription_id)!
    expect(created).toBeDefined()
    const stored = await testDb().selectFrom('stripe_events').selectAll().where('id', '=', created.id).executeTakeFirstOrThrow()
    expect(stored.outcome).toBe('applied')
    const versionBefore = (await billingRow(owner.slug)).version
    const replay = await postWebhook(baseUrl(), JSON.stringify(created), fake.secret)
    expect(replay.status).toBe(200)
    expect(replay.body).toEqual({ received: true, outcome: 'duplicate' })
    const afterReplay = await billingRow(owner.slug)
    expect(afterReplay.seats_paid).toBe(3)
    expect(afterReplay.version).toBe(versionBefore)
    const count = await testDb().selectFrom('stripe_events').select((eb) => eb.fn.countAll<string>().as('n')).where('id', '=', created.id).executeTakeFirstOrThrow()
    expect(Number(count.n)).toBe(1)
  })

  it('handles events out of order: a late, stale snapshot does not roll the state back', async () => {
    const row = await billingRow(owner.slug)
    const live = await fake.get(`subscriptions/${row.stripe_subscription_id}`)
    // An older view of the subscription (1 seat, past due) arriving after the newer ones.
    const stale = structuredClone(live)
    stale.items.data[0].quantity = 1
    stale.status = 'past_due'
    const event = { id: 'evt_late_snapshot_1', object: 'event', api_version: null, created: live.created - 60, livemode: false, pending_webhooks: 1, request: { id: null, idempotency_key: null }, type: 'customer.subscription.updated', data: { object: stale, previous_attributes: { status: 'active' } } }
    const res = await postWebhook(baseUrl(), JSON.stringify(event), fake.secret)
    expect(res.status).toBe(200)
    expect(res.body.outcome).toBe('applied')
    const after = await billingRow(owner.slug)
    expect(after).toMatchObject({ seats_paid: 3, status: 'active', grace_until: null })
  })

  it('every webhook the fake delivered so far was accepted', async () => {
    const ours = (await fake.deliveries()).filter((d) => d.url?.startsWith(baseUrl()))
    expect(ours.length).toBeGreaterThan(5)
    expect(ours.filter((d) => d.status !== 200)).toEqual([])
  })
})

describe('lapses', () => {
  // The fake's clock moves for every subscription it holds: start from an empty fake so that the armed decline
  // hits this organisation's renewal and no other.
  beforeAll(() => fake.control('reset'))

  it('payment failure → banner state and grace → read-only on every write, reads still work → paying restores', async () => {
    const { client, slug } = await subscribed('zola', 2)
    const manager = await join(client, slug, 'zola-manager@billing.test', 'manager')
    await fake.control('fail-next-payment?count=1')
    await fake.control('advance?days=32')
    await fake.deliveries()

    const grace = (await manager.get(`/api/orgs/${slug}/billing/standing`)).body
    expect(grace).toMatchObject({ state: 'grace', reason: 'payment_failed', readOnly: false, canManage: false, planName: 'Programme' })
    expect(Math.abs(new Date(grace.graceUntil).getTime() - (Date.now() + GRACE_DAYS * DAY))).toBeLessThan(120_000)
    expect((await billingRow(slug)).status).toBe('past_due')
    const invoices = (await client.get(`/api/orgs/${slug}/billing/invoices`)).body
    expect(invoices.items[0]).toMatchObject({ status: 'open', reason: 'subscription_cycle', total: { amount: 7800, currency: 'usd' }, amountPaid: { amount: 0 } })
    // Grace: still editing.
    expect((await client.patch(`/api/orgs/${slug}`, { name: 'zola Power East', version: 1 })).status).toBe(200)

    // The grace period runs out.
    await testDb().updateTable('organisation_billing').set({ grace_until: new Date(Date.now() - 1000) }).where('organisation_id', '=', await orgId(slug)).execute()
    expect((await manager.get(`/api/orgs/${slug}/billing/standing`)).body).toMatchObject({ state: 'read_only', reason: 'payment_failed', readOnly: true })
    const org = (await client.get(`/api/orgs/${slug}`)).body
    const members = (await client.get(`/api/orgs/${slug}/members`)).body as Array<{ userId: string; role: string }>
    const someId = members.find((m) => m.role === 'manager')!.userId
    const refusedMessage = /zola Power East is read-only because a payment for the Programme plan failed\. Everything is kept and can still be viewed and exported\./
    // Every write route refuses, except the few marked to work while read-only (paying; they are not called here,
    // as they would really change the subscription).
    const optedOut = (file: string) => readFileSync(path.join(ROOT, 'server/api', file), 'utf8').includes('allowWhenReadOnly: true')
    const billingWrites = ORG_ROUTES.filter((r) => r.file.startsWith('orgs/[org]/billing/') && r.method !== 'GET')
    expect(billingWrites.map((r) => r.file).filter(optedOut)).toHaveLength(4)
    for (const route of ORG_ROUTES.filter((r) => r.method !== 'GET' && can('owner', r.permission) && !optedOut(r.file))) {
      // Attachment routes take a compound id (<subject id>/attachments/<attachment id>); any id will do here.
      const id = route.idKind === 'findingAttachment' || route.idKind === 'workOrderAttachment' ? `${someId}/attachments/${someId}` : someId
      const res = await client.request(route.method, route.path.replace(':org', slug).replace(':id', id), route.body ?? {})
      expect(res.status, `${route.method} ${route.path} → ${JSON.stringify(res.body)}`).toBe(402)
      expect(res.body.data.message).toMatch(refusedMessage)
    }
    // Non-owners who may write are told who can fix it.
    const managerWrite = ORG_ROUTES.find((r) => r.method !== 'GET' && can('manager', r.permission) && !r.path.includes(':id'))
    if (managerWrite) {
      const res = await manager.request(managerWrite.method, managerWrite.path.replace(':org', slug), managerWrite.body ?? {})
      expect(res.status).toBe(402)
      expect(res.body.data.message).toMatch(/An owner can restore editing from the Billing page\./)
    }
    // Reads (and so exports) keep working, for every read route.
    for (const route of ORG_ROUTES.filter((r) => r.method === 'GET' && !r.path.includes(':id'))) {
      const res = await client.get(route.path.replace(':org', slug))
      expect(res.status, `${route.path} → ${JSON.stringify(res.body)}`).not.toBe(402)
      expect(res.status, `${route.path}`).toBeLessThan(500)
    }
    for (const p of ['', '/members', '/invitations', '/billing', '/billing/invoices']) {
      expect((await client.get(`/api/orgs/${slug}${p}`)).status, p).toBe(200)
    }
    expect((await client.get(`/api/orgs/${slug}`)).body.name).toBe('zola Power East')

    // The owner replaces the card in the portal; the open invoice is paid and editing comes back.
    const portal = await client.post(`/api/orgs/${slug}/billing/portal`)
    expect(portal.status).toBe(201)
    const action = await fetch(`${portal.body.url}/action`, { method: 'POST', redirect: 'manual', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'action=card&subscription=' })
    expect(action.status).toBe(303)
    await fake.deliveries()
    expect((await client.get(`/api/orgs/${slug}/billing/standing`)).body).toMatchObject({ state: 'active', readOnly: false, graceUntil: null })
    expect((await client.get(`/api/orgs/${slug}/billing/invoices`)).body.items[0]).toMatchObject({ status: 'paid', amountPaid: { amount: 7800 } })
    expect((await client.patch(`/api/orgs/${slug}`, { name: 'zola Power', version: org.version })).status).toBe(200)
  })

  it('cancelling takes effect at the period end, then the organisation is read-only', async () => {
    const { client, slug } = await subscribed('abel', 1)
    const cancel = await client.post(`/api/orgs/${slug}/billing/cancel`)
    expect(cancel.status).toBe(200)
    expect(cancel.body).toMatchObject({ status: 'active', cancelAtPeriodEnd: true, subscribed: true, standing: { state: 'active' } })
    expect((await client.patch(`/api/orgs/${slug}`, { name: 'abel Power Co', version: 1 })).status).toBe(200)
    await fake.control('advance?days=32')
    await fake.deliveries()
    const after = (await client.get(`/api/orgs/${slug}/billing`)).body
    expect(after).toMatchObject({ status: 'canceled', subscribed: false, canSubscribe: true, standing: { state: 'read_only', reason: 'ended' } })
    expect(after.endedAt).not.toBeNull()
    const refused = await client.patch(`/api/orgs/${slug}`, { name: 'abel Power Ltd', version: 2 })
    expect(refused.status).toBe(402)
    expect(refused.body.data.message).toMatch(/its subscription has ended/)
    // Subscribing again restores editing.
    const checkout = await client.post(`/api/orgs/${slug}/billing/checkout`, { plan: 'utility', interval: 'year', seats: 1 })
    expect(checkout.status).toBe(201)
    await payCheckout(checkout.body.url)
    const back = (await client.get(`/api/orgs/${slug}/billing`)).body
    expect(back).toMatchObject({ plan: { key: 'utility' }, interval: 'year', status: 'active', standing: { state: 'active' } })
    // 1 seat × 690.00 per year
    expect(back.periodTotal).toEqual({ amount: 69000, currency: 'usd' })
    expect((await client.patch(`/api/orgs/${slug}`, { name: 'abel Power Ltd', version: 2 })).status).toBe(200)
  })
})

describe('roles', () => {
  it('keeps billing to owners; every member sees the standing', async () => {
    const { client, slug } = await signUpOwner('Bea Roles', 'bea@billing.test', 'Bea Energy')
    const manager = await join(client, slug, 'bea-manager@billing.test', 'manager')
    const viewer = await join(client, slug, 'bea-viewer@billing.test', 'viewer')
    for (const c of [manager, viewer]) {
      expect((await c.get(`/api/orgs/${slug}/billing`)).status).toBe(403)
      expect((await c.post(`/api/orgs/${slug}/billing/checkout`, { plan: 'programme', interval: 'month', seats: 5 })).status).toBe(403)
      const standing = await c.get(`/api/orgs/${slug}/billing/standing`)
      expect(standing.status).toBe(200)
      expect(standing.body).toMatchObject({ state: 'trial', canManage: false })
    }
    const res = await client.post(`/api/orgs/${slug}/billing/seats`, { seats: 12 })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/on the trial, which has a fixed number of seats/)
    expect((await client.post(`/api/orgs/${slug}/billing/portal`)).status).toBe(409)
  })
})
