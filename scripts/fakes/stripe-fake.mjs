// A small local stand-in for the Stripe API, spoken to by the unchanged `stripe` SDK
// (`new Stripe(key, { host, port, protocol: 'http' })`). It answers Stripe's form-encoded requests with
// Stripe-shaped JSON, serves its own Checkout, portal and invoice pages, and sends webhooks signed the
// way Stripe signs them, so the app's verification code runs unchanged. Loopback only, test keys only.
//
// Layout: stripe-params.mjs (decoding, lists, expand), stripe-objects.mjs (object shapes),
// stripe-billing.mjs (the rules), stripe-pages.mjs (HTML); this file is the HTTP layer and webhooks.
//
// Test controls (no auth, loopback only):
//   POST /_control/fail-next-payment?count=N[&always=true]   arm card declines (count=0 disarms)
//   POST /_control/advance?days=N[&hours=H]                  move the clock; renewals and period ends run
//   POST /_control/webhook-url?url=…                         change where webhooks go
//   GET  /_control/webhooks                                   deliveries so far (waits for the queue)
//   POST /_control/reset                                      forget everything except the catalogue (deliveries too)
//   GET  /_control/health
import fs from 'node:fs'
import http from 'node:http'
import Stripe from 'stripe'
import { Billing, DEFAULT_PLANS, emptyStore } from './stripe-billing.mjs'
import { StripeFakeError, invalid, missing, newId } from './stripe-objects.mjs'
import { bool, expand, int, listEnvelope, parseStripeForm } from './stripe-params.mjs'
import { checkoutPage, invoicePage, portalPage } from './stripe-pages.mjs'

export { DEFAULT_PLANS }

const MAX_DELIVERIES = 500

/**
 * @typedef {{ event: string, type: string, url: string | null, status: number | null, attempts: number, error: string | null }} WebhookDelivery
 * @typedef {{ port: number, host: string, url: string, idle: (timeoutMs?: number) => Promise<unknown>, deliveries: () => WebhookDelivery[], setWebhookUrl: (url: string | null) => void, failNextPayment: (count?: number) => void, advance: (days: number) => { now: number, clock_offset_days: number }, close: () => Promise<void> }} StripeFake
 */

/**
 * Starts the Stripe fake on 127.0.0.1 (port 0 = any free port).
 * @param {{ port?: number, host?: string, webhookUrl?: string | null, webhookSecret?: string, stateFile?: string | null, plans?: typeof DEFAULT_PLANS, currency?: string, webhookRetryDelaysMs?: number[], log?: (line: string) => void }} [options]
 * @returns {Promise<StripeFake>}
 */
export async function startStripeFake({
  port = 0, host = '127.0.0.1', webhookUrl = null, webhookSecret = 'whsec_greybody_local', stateFile = null,
  plans = DEFAULT_PLANS, currency = 'usd', webhookRetryDelaysMs = [500, 2000], log = () => {},
} = {}) {
  let baseUrl = ''
  let target = webhookUrl
  /** @type {WebhookDelivery[]} */
  const deliveries = []
  let queue = Promise.resolve()
  const idempotent = new Map()
  const stored = stateFile && fs.existsSync(stateFile) ? { ...emptyStore(), ...JSON.parse(fs.readFileSync(stateFile, 'utf8')) } : emptyStore()
  const b = new Billing({ store: stored, baseUrl: () => baseUrl, onEvent: deliver, plans, currency })
  const save = () => {
    if (!stateFile) return
    fs.writeFileSync(`${stateFile}.tmp`, JSON.stringify(b.store))
    fs.renameSync(`${stateFile}.tmp`, stateFile)
  }

  // One delivery at a time keeps events in the order they happened (the app must still cope with others).
  function deliver(event) {
    queue = queue.then(async () => {
      /** @type {WebhookDelivery} */
      const record = { event: event.id, type: event.type, url: target, status: null, attempts: 0, error: 'no webhook URL configured' }
      deliveries.push(record)
      if (deliveries.length > MAX_DELIVERIES) deliveries.shift()
      if (!target) return
      const payload = JSON.stringify(event, null, 2)
      for (let attempt = 0; attempt <= webhookRetryDelaysMs.length; attempt++) {
        if (attempt > 0) await new Promise((r) => setTimeout(r, webhookRetryDelaysMs[attempt - 1]))
        record.attempts++
        try {
          const signature = Stripe.webhooks.generateTestHeaderString({ payload, secret: webhookSecret })
          const res = await fetch(target, {
            method: 'POST',
            headers: { 'content-type': 'application/json; charset=utf-8', 'stripe-signature': signature, 'user-agent': 'Stripe/1.0 (+https://stripe.com/docs/webhooks)' },
            body: payload,
            signal: AbortSignal.timeout(15_000),
          })
          await res.arrayBuffer().catch(() => null)
          record.status = res.status
          record.error = res.ok ? null : `HTTP ${res.status}`
          if (res.ok) return
        } catch (err) {
          record.error = err instanceof Error ? err.message : String(err)
        }
      }
      log(`webhook ${event.type} ${event.id} to ${target} failed: ${record.error}`)
    })
  }
  // Pages wait for their webhooks so that the app already knows the outcome when the browser returns to it.
  const idle = (timeoutMs = 10_000) => Promise.race([queue, new Promise((r) => setTimeout(r, timeoutMs).unref())])

  const byCustomer = (p) => (o) => !p.customer || o.customer === p.customer
  const subscriptionStatus = (p) => (s) => (p.status === 'all' ? true : p.status ? s.status === p.status : !['canceled', 'incomplete_expired'].includes(s.status))
  const list = (collection, keep) => ({ p, path }) => listEnvelope(b.newestFirst(collection, keep(p)), p, path)
  const checkoutSession = (id) => b.get('checkoutSessions', id, 'checkout.session')
  const lineItems = (session, p, path) => listEnvelope(b.checkoutLineItems(session), p, path)

  /** @type {[string, string, (r: { id: string, p: any, path: string }) => any][]} */
  const table = [
    ['POST', '/v1/customers', ({ p }) => b.createCustomer(p)],
    ['GET', '/v1/customers', list('customers', (p) => (c) => !p.email || c.email === p.email)],
    ['GET', '/v1/customers/:id', ({ id }) => b.get('customers', id, 'customer')],
    ['POST', '/v1/customers/:id', ({ id, p }) => b.updateCustomer(b.get('customers', id, 'customer'), p)],
    ['DELETE', '/v1/customers/:id', ({ id }) => {
      b.get('customers', id, 'customer')
      delete b.store.customers[id]
      return { id, object: 'customer', deleted: true }
    }],
    ['GET', '/v1/products', list('products', (p) => (x) => p.active === undefined || x.active === bool(p.active))],
    ['GET', '/v1/products/:id', ({ id }) => b.get('products', id, 'product')],
    ['GET', '/v1/prices', list('prices', (p) => (x) =>
      (!p.product || x.product === p.product) && (!p.lookup_keys || [].concat(p.lookup_keys).includes(x.lookup_key)) &&
      (p.active === undefined || x.active === bool(p.active)) && (!p.currency || x.currency === p.currency) &&
      (!p.recurring?.interval || x.recurring.interval === p.recurring.interval))],
    ['GET', '/v1/prices/:id', ({ id }) => b.get('prices', id, 'price')],
    ['POST', '/v1/checkout/sessions', ({ p }) => b.createCheckoutSession(p)],
    ['GET', '/v1/checkout/sessions', list('checkoutSessions', (p) => (s) => byCustomer(p)(s) && (!p.subscription || s.subscription === p.subscription))],
    ['GET', '/v1/checkout/sessions/:id', ({ id, p }) => {
      const s = checkoutSession(id)
      const wantsLines = [].concat(p.expand ?? []).includes('line_items')
      return wantsLines ? { ...s, line_items: lineItems(s, { limit: 100 }, `/v1/checkout/sessions/${id}/line_items`) } : s
    }],
    ['GET', '/v1/checkout/sessions/:id/line_items', ({ id, p, path }) => lineItems(checkoutSession(id), p, path)],
    ['POST', '/v1/checkout/sessions/:id/expire', ({ id }) => {
      const s = checkoutSession(id)
      if (s.status !== 'open') throw invalid(`This Checkout Session is ${s.status}.`)
      s.status = 'expired'
      return s
    }],
    ['POST', '/v1/subscriptions', ({ p }) => b.createSubscription(p)],
    ['GET', '/v1/subscriptions', list('subscriptions', (p) => (s) =>
      byCustomer(p)(s) && subscriptionStatus(p)(s) && (!p.price || s.items.data.some((i) => i.price.id === p.price)))],
    ['GET', '/v1/subscriptions/:id', ({ id }) => b.get('subscriptions', id, 'subscription')],
    ['POST', '/v1/subscriptions/:id', ({ id, p }) => b.updateSubscription(b.get('subscriptions', id, 'subscription'), p)],
    ['DELETE', '/v1/subscriptions/:id', ({ id }) => b.cancelSubscription(b.get('subscriptions', id, 'subscription'))],
    ['POST', '/v1/subscription_items/:id', ({ id, p }) => {
      const sub = b.newestFirst('subscriptions', (s) => s.items.data.some((i) => i.id === id))[0]
      if (!sub) throw missing('subscription item', id)
      b.updateSubscription(sub, { ...p, items: [{ id, price: p.price, quantity: p.quantity }] })
      return sub.items.data.find((i) => i.id === id)
    }],
    ['GET', '/v1/invoices', list('invoices', (p) => (i) =>
      byCustomer(p)(i) && (!p.subscription || i.parent.subscription_details.subscription === p.subscription) && (!p.status || i.status === p.status))],
    ['GET', '/v1/invoices/:id', ({ id }) => b.get('invoices', id, 'invoice')],
    ['POST', '/v1/invoices/:id/pay', ({ id }) => {
      const inv = b.get('invoices', id, 'invoice')
      if (!b.payInvoice(inv)) throw new StripeFakeError(402, 'Your card was declined.', { type: 'card_error', code: 'card_declined', decline_code: 'generic_decline' })
      return inv
    }],
    ['POST', '/v1/billing_portal/sessions', ({ p }) => b.createPortalSession(p)],
    ['GET', '/v1/events', list('events', (p) => (e) => !p.type || e.type === p.type)],
    ['GET', '/v1/events/:id', ({ id }) => b.get('events', id, 'event')],
  ]
  const routes = table.map(([method, pattern, handler]) => ({ method, re: new RegExp(`^${pattern.replace(':id', '([^/]+)')}$`), handler }))

  function send(res, status, body, headers = {}) {
    const html = typeof body === 'string'
    res.writeHead(status, { 'content-type': html ? 'text/html; charset=utf-8' : 'application/json', 'cache-control': 'no-store', ...headers })
    res.end(html ? body : JSON.stringify(body, null, 2))
  }

  function api(req, res, path, p) {
    const headers = { 'request-id': newId('req'), 'stripe-version': Stripe.API_VERSION }
    const key = String(req.headers.authorization ?? '').replace(/^Bearer\s+/i, '')
    if (!/^(sk|rk)_test_\w+/.test(key)) return send(res, 401, new StripeFakeError(401, 'Invalid API key provided: the local fake accepts test keys (sk_test_…) only.').body, headers)
    // The SDK retries POSTs with the same Idempotency-Key; a replay must not create a second object.
    const idemKey = req.method === 'POST' ? req.headers['idempotency-key'] : undefined
    const replay = idemKey && idempotent.get(idemKey)
    if (replay) return send(res, replay.status, replay.body, { ...headers, 'idempotent-replayed': 'true' })
    let status = 200
    let body
    try {
      const route = routes.find((r) => r.method === req.method && r.re.test(path))
      if (!route) throw new StripeFakeError(404, `Unrecognized request URL (${req.method}: ${path}).`)
      const id = decodeURIComponent(path.match(route.re)?.[1] ?? '')
      const paths = [].concat(p.expand ?? []).filter((x) => x !== 'line_items')
      body = expand(route.handler({ id, p, path }), paths, (ref) => b.lookup(ref))
    } catch (err) {
      const known = err instanceof StripeFakeError ? err : err instanceof TypeError ? invalid(err.message) : null
      if (!known) throw err
      status = known.status
      body = known.body
    }
    if (idemKey) {
      idempotent.set(idemKey, { status, body })
      if (idempotent.size > 1000) idempotent.delete(idempotent.keys().next().value)
    }
    if (req.method !== 'GET') save()
    send(res, status, body, headers)
  }

  async function control(res, path, p) {
    if (path === '/_control/health') return send(res, 200, { ok: true, now: b.now(), fail_next: b.store.failNext, decline_all: b.store.declineAll, webhook_url: target })
    if (path === '/_control/fail-next-payment') {
      Object.assign(b.store, { failNext: int(p.count) ?? 1, declineAll: bool(p.always) })
      save()
      return send(res, 200, { fail_next: b.store.failNext, decline_all: b.store.declineAll })
    }
    if (path === '/_control/advance') {
      const result = b.advance(Number(p.days ?? 0) + Number(p.hours ?? 0) / 24)
      save()
      return send(res, 200, result)
    }
    if (path === '/_control/webhook-url') {
      target = p.url || null
      return send(res, 200, { webhook_url: target })
    }
    if (path === '/_control/webhooks') {
      await idle()
      return send(res, 200, deliveries)
    }
    if (path === '/_control/reset') {
      b.reset()
      idempotent.clear()
      // Deliveries go too, so a test that checks "every webhook was accepted" sees only its own.
      deliveries.length = 0
      save()
      return send(res, 200, { ok: true })
    }
    send(res, 404, { error: 'unknown control endpoint' })
  }

  async function pages(req, res, path, p) {
    const [, kind, id, action] = path.split('/')
    const session = kind === 'checkout' ? b.store.checkoutSessions[id] : undefined
    const portal = kind === 'portal' ? b.store.portalSessions[id] : undefined
    const invoice = kind === 'invoices' ? b.store.invoices[id] : undefined
    const checkout = (error) => checkoutPage({
      session, email: b.payerEmail(session), error,
      lines: b.checkoutLineItems(session).map((l) => ({ description: l.description, quantity: l.quantity, amount: l.amount_total })),
    })
    if (session && !action && req.method === 'GET') return send(res, 200, checkout())
    if (session && action === 'pay' && req.method === 'POST') {
      try {
        b.completeCheckout(session, p.email)
      } catch (err) {
        if (!(err instanceof StripeFakeError)) throw err
        return send(res, err.status, checkout(err.message))
      } finally {
        save()
      }
      await idle()
      return send(res, 303, '', { location: session.success_url })
    }
    if (portal && !action && req.method === 'GET') {
      const subscriptions = b.newestFirst('subscriptions', (s) => s.customer === portal.customer && s.status !== 'canceled')
      const planName = (priceId) => b.store.products[b.store.prices[priceId]?.product]?.name ?? priceId
      return send(res, 200, portalPage({ portal, customer: b.store.customers[portal.customer], subscriptions, planName }))
    }
    if (portal && action === 'action' && req.method === 'POST') {
      try {
        b.portalAction(portal, p.action, p.subscription)
      } finally {
        save()
      }
      await idle()
      return send(res, 303, '', { location: `/portal/${portal.id}` })
    }
    if (invoice && !action && req.method === 'GET') return send(res, 200, invoicePage(invoice))
    send(res, 404, '<!doctype html><title>Not found</title><p>Not found.</p>')
  }

  const server = http.createServer(async (req, res) => {
    try {
      const url = new URL(req.url ?? '/', 'http://localhost')
      const chunks = []
      for await (const chunk of req) chunks.push(chunk)
      const p = { ...parseStripeForm(url.search.slice(1)), ...parseStripeForm(Buffer.concat(chunks).toString('utf8')) }
      if (url.pathname.startsWith('/v1/')) return api(req, res, url.pathname, p)
      if (url.pathname.startsWith('/_control/')) return await control(res, url.pathname, p)
      await pages(req, res, url.pathname, p)
    } catch (err) {
      if (err instanceof StripeFakeError) return send(res, err.status, `<!doctype html><title>Error</title><p>${err.message.replace(/[<>&]/g, '')}</p>`)
      log(`stripe fake error: ${err instanceof Error ? err.stack : err}`)
      if (!res.headersSent) send(res, 500, { error: { type: 'api_error', message: err instanceof Error ? err.message : String(err) } })
    }
  })
  await new Promise((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => {
      server.off('error', reject)
      resolve(undefined)
    })
  })
  const actualPort = /** @type {import('node:net').AddressInfo} */ (server.address()).port
  baseUrl = `http://${host}:${actualPort}`
  save()

  return {
    port: actualPort,
    host,
    url: baseUrl,
    idle,
    deliveries: () => deliveries.slice(),
    setWebhookUrl: (url) => { target = url },
    failNextPayment: (count = 1) => { b.store.failNext = count },
    advance: (days) => {
      const result = b.advance(days)
      save()
      return result
    },
    close: async () => {
      await idle()
      server.closeAllConnections()
      await new Promise((resolve) => server.close(() => resolve(undefined)))
    },
  }
}
