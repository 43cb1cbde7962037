import http from 'node:http'
import Stripe from 'stripe'
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { startStripeFake } from '../../../scripts/fakes/stripe-fake.mjs'

const WEBHOOK_SECRET = 'whsec_unit_test'

type Received = { event: Stripe.Event | null, error: string | null }

describe('Stripe fake with the unchanged stripe SDK', () => {
  let fake: Awaited<ReturnType<typeof startStripeFake>>
  let receiver: http.Server
  let received: Received[] = []
  let stripe: Stripe
  const verifier = new Stripe('sk_test_verifier')

  beforeAll(async () => {
    // Verifies every delivery exactly as the app's webhook route will.
    receiver = http.createServer((req, res) => {
      const chunks: Buffer[] = []
      req.on('data', (c: Buffer) => chunks.push(c))
      req.on('end', () => {
        try {
          const event = verifier.webhooks.constructEvent(Buffer.concat(chunks), String(req.headers['stripe-signature']), WEBHOOK_SECRET)
          received.push({ event, error: null })
          res.writeHead(200).end('{"received":true}')
        } catch (err) {
          received.push({ event: null, error: (err as Error).message })
          res.writeHead(400).end()
        }
      })
    })
    await new Promise<void>((resolve) => receiver.listen(0, '127.0.0.1', resolve))
    const { port } = receiver.address() as { port: number }
    fake = await startStripeFake({ port: 0, webhookUrl: `http://127.0.0.1:${port}/api/stripe/webhook`, webhookSecret: WEBHOOK_SECRET, webhookRetryDelaysMs: [] })
    stripe = new Stripe('sk_test_greybody_unit', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 })
  })
  afterAll(async () => {
    await fake?.close()
    receiver?.close()
  })
  beforeEach(async () => {
    await fetch(`${fake.url}/_control/reset`, { method: 'POST' })
    received = []
  })

  const eventsOfType = (type: string) => received.filter((r) => r.event?.type === type).map((r) => r.event!)

  async function subscribeThroughCheckout(seats: number) {
    const customer = await stripe.customers.create({ email: 'owner@north-fen.test', name: 'North Fen Power', metadata: { organisation_id: 'org_1' } })
    const session = await stripe.checkout.sessions.create({
      mode: 'subscription',
      customer: customer.id,
      line_items: [{ price: 'price_programme_monthly', quantity: seats }],
      success_url: 'http://127.0.0.1:3000/orgs/north-fen/billing?session={CHECKOUT_SESSION_ID}',
      cancel_url: 'http://127.0.0.1:3000/orgs/north-fen/billing',
      client_reference_id: 'org_1',
      subscription_data: { metadata: { organisation_id: 'org_1' } },
    })
    const page = await fetch(session.url!)
    expect(page.status).toBe(200)
    expect(await page.text()).toContain('>Pay</button>')
    const paid = await fetch(`${session.url}/pay`, { method: 'POST', redirect: 'manual' })
    expect(paid.status).toBe(303)
    expect(paid.headers.get('location')).toBe(`http://127.0.0.1:3000/orgs/north-fen/billing?session=${session.id}`)
    return { customer, session }
  }

  it('serves the seeded catalogue in integer minor units', async () => {
    const prices = await stripe.prices.list({ lookup_keys: ['programme_monthly', 'utility_yearly'], expand: ['data.product'] })
    const byKey = Object.fromEntries(prices.data.map((p) => [p.lookup_key, p]))
    const programme = byKey.programme_monthly!
    const utility = byKey.utility_yearly!
    expect(programme.unit_amount).toBe(3900)
    expect(programme.recurring?.interval).toBe('month')
    expect((programme.product as Stripe.Product).name).toBe('Programme')
    expect(utility.unit_amount).toBe(69000)
    const products = await stripe.products.list()
    expect(products.data.map((p) => p.name).sort()).toEqual(['Programme', 'Trial', 'Utility'])
  })

  it('subscribes through Checkout, changes seats with proration and sends verifiable webhooks', async () => {
    const { customer, session } = await subscribeThroughCheckout(3)

    const completed = await stripe.checkout.sessions.retrieve(session.id, { expand: ['subscription'] })
    expect(completed.status).toBe('complete')
    expect(completed.payment_status).toBe('paid')
    const sub = completed.subscription as Stripe.Subscription
    expect(sub.status).toBe('active')
    expect(sub.customer).toBe(customer.id)
    expect(sub.metadata.organisation_id).toBe('org_1')
    const item = sub.items.data[0]!
    expect(item.quantity).toBe(3)
    expect(item.price.id).toBe('price_programme_monthly')
    expect(item.current_period_end).toBeGreaterThan(item.current_period_start + 27 * 86_400)

    const first = await stripe.invoices.list({ subscription: sub.id })
    expect(first.data).toHaveLength(1)
    // 3 seats × 39.00 per seat, in minor units: common practice (per-seat price × quantity)
    expect(first.data[0]!.amount_paid).toBe(3 * 3900)
    expect(first.data[0]!.status).toBe('paid')

    const updated = await stripe.subscriptions.update(sub.id, {
      items: [{ id: item.id, quantity: 5 }],
      proration_behavior: 'always_invoice',
    })
    expect(updated.items.data[0]!.quantity).toBe(5)
    const invoices = await stripe.invoices.list({ customer: customer.id })
    expect(invoices.data).toHaveLength(2)
    const proration = invoices.data[0]!
    expect(proration.billing_reason).toBe('subscription_update')
    expect(proration.parent?.subscription_details?.subscription).toBe(sub.id)
    // Two extra seats for (almost) the whole period: close to 2 × 3900, never more. Common practice
    // (time-proportional proration); a few seconds pass between the two calls.
    expect(proration.total).toBeLessThanOrEqual(2 * 3900)
    expect(proration.total).toBeGreaterThan(2 * 3900 - 10)
    expect(proration.status).toBe('paid')

    const listed = await stripe.subscriptions.list({ customer: customer.id })
    expect(listed.data.map((s) => s.id)).toEqual([sub.id])

    await fake.idle()
    expect(received.filter((r) => r.error)).toEqual([])
    expect(eventsOfType('checkout.session.completed').map((e) => (e.data.object as Stripe.Checkout.Session).subscription)).toEqual([sub.id])
    expect(eventsOfType('customer.subscription.created')).toHaveLength(1)
    const seatChange = eventsOfType('customer.subscription.updated')[0]!
    expect((seatChange.data.object as Stripe.Subscription).items.data[0]!.quantity).toBe(5)
    const before = seatChange.data.previous_attributes as Partial<Stripe.Subscription>
    expect(before.items?.data[0]?.quantity).toBe(3)
    expect(eventsOfType('invoice.paid')).toHaveLength(2)
  })

  it('signs webhooks with the configured secret only', async () => {
    await stripe.customers.create({ email: 'x@example.test' })
    await subscribeThroughCheckout(1)
    await fake.idle()
    const delivery = fake.deliveries().at(-1)!
    expect(delivery.status).toBe(200)
    const event = await stripe.events.retrieve(delivery.event)
    const payload = JSON.stringify(event, null, 2)
    const header = Stripe.webhooks.generateTestHeaderString({ payload, secret: 'whsec_someone_else' })
    expect(() => verifier.webhooks.constructEvent(payload, header, WEBHOOK_SECRET)).toThrow(/signature/i)
  })

  it('fails a renewal on demand, recovers on retry and ends a subscription cancelled at period end', async () => {
    const { session } = await subscribeThroughCheckout(2)
    const subId = (await stripe.checkout.sessions.retrieve(session.id)).subscription as string

    await fetch(`${fake.url}/_control/fail-next-payment`, { method: 'POST' })
    await fetch(`${fake.url}/_control/advance?days=32`, { method: 'POST' })
    expect((await stripe.subscriptions.retrieve(subId)).status).toBe('past_due')
    const open = await stripe.invoices.list({ subscription: subId, status: 'open' })
    expect(open.data).toHaveLength(1)
    expect(open.data[0]!.billing_reason).toBe('subscription_cycle')

    await fetch(`${fake.url}/_control/advance?days=1`, { method: 'POST' })
    expect((await stripe.subscriptions.retrieve(subId)).status).toBe('active')

    const cancelling = await stripe.subscriptions.update(subId, { cancel_at_period_end: true })
    expect(cancelling.cancel_at).toBe(cancelling.items.data[0]!.current_period_end)
    await fetch(`${fake.url}/_control/advance?days=40`, { method: 'POST' })
    const ended = await stripe.subscriptions.retrieve(subId)
    expect(ended.status).toBe('canceled')
    expect((await stripe.subscriptions.list({ customer: ended.customer as string })).data).toHaveLength(0)

    await fake.idle()
    expect(received.filter((r) => r.error)).toEqual([])
    expect(eventsOfType('invoice.payment_failed')).toHaveLength(1)
    expect(eventsOfType('customer.subscription.deleted').map((e) => (e.data.object as Stripe.Subscription).id)).toEqual([subId])
  })

  it('answers with Stripe errors the SDK understands', async () => {
    await expect(stripe.customers.retrieve('cus_missing')).rejects.toMatchObject({ type: 'StripeInvalidRequestError', statusCode: 404, code: 'resource_missing' })
    const live = new Stripe('sk_live_nope', { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 })
    await expect(live.customers.list()).rejects.toMatchObject({ type: 'StripeAuthenticationError', statusCode: 401 })
    const customer = await stripe.customers.create({ email: 'y@example.test' })
    await expect(stripe.subscriptions.create({ customer: customer.id, items: [{ price: 'price_nope' }] })).rejects.toMatchObject({ statusCode: 404, param: 'items[0][price]' })
  })

  it('opens a billing portal where the owner can cancel at period end', async () => {
    const { customer, session } = await subscribeThroughCheckout(1)
    const subId = (await stripe.checkout.sessions.retrieve(session.id)).subscription as string
    const portal = await stripe.billingPortal.sessions.create({ customer: customer.id, return_url: 'http://127.0.0.1:3000/orgs/north-fen/billing' })
    const page = await fetch(portal.url)
    expect(await page.text()).toContain('owner@north-fen.test')
    const action = await fetch(`${portal.url}/action`, { method: 'POST', body: new URLSearchParams({ action: 'cancel', subscription: subId }), redirect: 'manual' })
    expect(action.status).toBe(303)
    expect((await stripe.subscriptions.retrieve(subId)).cancel_at_period_end).toBe(true)
  })
})
