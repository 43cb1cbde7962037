// Billing rules of the local Stripe fake: the catalogue, customers, per-seat subscriptions with
// prorations, invoices and payments, Checkout completion, the portal's actions and a movable clock.
// The HTTP layer (stripe-fake.mjs) only decodes requests and routes them here.
//
// Deliberate simplifications: every customer has a working card unless a decline is armed; past-due
// invoices are retried once per clock advance and never lead to automatic cancellation; no taxes,
// discounts, schedules or test clocks.
import {
  DAY, addInterval, checkoutSessionObject, customerObject, declined, eventObject, invalid, invoiceLineObject,
  invoiceObject, missing, newId, portalSessionObject, priceObject, productObject, subscriptionItemObject, subscriptionObject,
} from './stripe-objects.mjs'
import { bool, int, mergeMetadata } from './stripe-params.mjs'

/** Seeded catalogue: our own plan names; per-seat prices in integer minor units per interval. */
export const DEFAULT_PLANS = [
  { key: 'trial', name: 'Trial', description: 'Every feature for a short evaluation', prices: { month: 0 } },
  { key: 'programme', name: 'Programme', description: 'One inspection programme', prices: { month: 3900, year: 39000 } },
  { key: 'utility', name: 'Utility', description: 'Utilities running several programmes', prices: { month: 6900, year: 69000 } },
]

const MAX_EVENTS = 500
const COLLECTIONS = { cus: 'customers', prod: 'products', price: 'prices', sub: 'subscriptions', in: 'invoices', cs: 'checkoutSessions', evt: 'events', bps: 'portalSessions' }
const ENDED = ['canceled', 'incomplete_expired']

/** The fake's whole state; plain JSON so that it can be written to disk between restarts. */
export function emptyStore() {
  return {
    clockOffset: 0, failNext: 0, declineAll: false, invoiceSeq: 0,
    customers: {}, products: {}, prices: {}, subscriptions: {}, invoices: {}, checkoutSessions: {},
    checkoutLines: {}, portalSessions: {}, events: {}, pendingLines: {},
  }
}

const periodOf = (sub) => ({ start: sub.items.data[0].current_period_start, end: sub.items.data[0].current_period_end })
const intervalOf = (sub) => sub.items.data[0].price.recurring.interval
const sum = (lines) => lines.reduce((s, l) => s + l.amount, 0)

/** Top-level attributes that differ, with their previous values (Stripe's `previous_attributes`). */
function diff(before, after) {
  const out = {}
  for (const k of Object.keys(after)) if (JSON.stringify(before[k]) !== JSON.stringify(after[k])) out[k] = before[k]
  return Object.keys(out).length ? out : null
}

export class Billing {
  /** @param {{ store: any, baseUrl: () => string, onEvent: (event: any) => void, plans: typeof DEFAULT_PLANS, currency: string }} options */
  constructor({ store, baseUrl, onEvent, plans, currency }) {
    this.store = store
    this.baseUrl = baseUrl
    this.onEvent = onEvent
    this.plans = plans
    this.currency = currency
    this.seedCatalogue()
  }

  now() { return Math.floor(Date.now() / 1000) + this.store.clockOffset }

  reset() {
    this.store = emptyStore()
    this.seedCatalogue()
  }

  // Rewritten on every start so that a changed plan list reaches a persisted store.
  seedCatalogue() {
    for (const plan of this.plans) {
      const intervals = Object.keys(plan.prices)
      const created = this.store.products[`prod_${plan.key}`]?.created ?? this.now()
      const product = productObject({ ...plan, defaultPrice: `price_${plan.key}_${intervals[0]}ly`, created })
      this.store.products[product.id] = product
      for (const interval of intervals) {
        const price = priceObject({ planKey: plan.key, planName: plan.name, interval, amount: plan.prices[interval], currency: this.currency, created })
        this.store.prices[price.id] = price
      }
    }
  }

  lookup(id) {
    const name = COLLECTIONS[String(id).split('_')[0]]
    return name ? this.store[name][id] : undefined
  }
  get(collection, id, kind, param = 'id') {
    const found = this.store[collection][id]
    if (!found) throw missing(kind, id, param)
    return found
  }
  newestFirst(collection, keep = (_o) => true) {
    return Object.values(this.store[collection]).filter(keep).reverse()
  }

  emit(type, object, previous) {
    const event = eventObject({ type, object, previous, created: this.now() })
    const ids = Object.keys(this.store.events)
    for (const old of ids.slice(0, Math.max(0, ids.length + 1 - MAX_EVENTS))) delete this.store.events[old]
    this.store.events[event.id] = event
    this.onEvent(event)
  }

  // An armed decline is consumed only by a payment that actually moves money.
  declines(amountDue) {
    if (amountDue <= 0) return false
    if (this.store.declineAll) return true
    if (this.store.failNext > 0) {
      this.store.failNext--
      return true
    }
    return false
  }

  createCustomer(p) {
    const c = customerObject({ ...p, metadata: mergeMetadata({}, p.metadata), paymentMethod: p.payment_method, created: this.now() })
    this.store.customers[c.id] = c
    return c
  }
  updateCustomer(c, p) {
    for (const k of ['email', 'name', 'description', 'phone']) if (p[k] !== undefined) c[k] = p[k] || null
    c.metadata = mergeMetadata(c.metadata, p.metadata)
    const pm = p.invoice_settings?.default_payment_method
    if (pm !== undefined) c.invoice_settings.default_payment_method = pm || null
    return c
  }

  price(id, param) {
    const price = this.get('prices', id, 'price', param)
    if (price.type !== 'recurring') throw invalid(`The price '${id}' is not recurring.`, param)
    return price
  }
  newItem(subscription, price, quantity, period) {
    return subscriptionItemObject({ subscription, price, quantity, period, created: this.now() })
  }
  line(sub, item, amount, description, proration = false) {
    return invoiceLineObject({ subscription: sub.id, item, amount, description, proration, period: periodOf(sub) })
  }
  seatLabel(item) {
    return `${item.quantity} seat${item.quantity === 1 ? '' : 's'} × ${this.store.products[item.price.product]?.name ?? item.price.id}`
  }
  fullLines(sub) {
    return sub.items.data.map((i) => this.line(sub, i, i.price.unit_amount * i.quantity, this.seatLabel(i)))
  }

  createInvoice(sub, lines, reason, period) {
    const customer = this.store.customers[sub.customer]
    const total = sum(lines)
    // Credits from downgrades sit on the customer balance (negative) and reduce what is due next.
    const startingBalance = customer.balance
    const amountDue = Math.max(0, total + startingBalance)
    customer.balance = Math.min(0, total + startingBalance)
    const id = newId('in')
    for (const l of lines) l.invoice = id
    const number = `GBF-${String(++this.store.invoiceSeq).padStart(5, '0')}`
    const t = this.now()
    const inv = invoiceObject({ id, number, sub, customer, lines, reason, amountDue, startingBalance, period: period ?? { start: t, end: t }, created: t, baseUrl: this.baseUrl() })
    this.store.invoices[id] = inv
    sub.latest_invoice = id
    return inv
  }

  /** Attempts payment of an open invoice; emits invoice.paid or invoice.payment_failed. */
  pay(inv) {
    if (inv.status === 'paid') return true
    const customer = this.store.customers[inv.customer]
    inv.attempted = true
    inv.attempt_count++
    if (this.declines(inv.amount_due)) {
      inv.next_payment_attempt = this.now() + 3 * DAY
      if (customer) customer.delinquent = true
      this.emit('invoice.payment_failed', inv)
      return false
    }
    Object.assign(inv, { status: 'paid', amount_paid: inv.amount_due, amount_remaining: 0, next_payment_attempt: null })
    inv.status_transitions.paid_at = this.now()
    if (customer) customer.delinquent = false
    this.emit('invoice.paid', inv)
    return true
  }
  openInvoices(sub) {
    return this.newestFirst('invoices', (i) => i.parent.subscription_details.subscription === sub.id && i.status === 'open')
  }
  /** Sets past_due/active from the open invoices; emits customer.subscription.updated when that changes. */
  settle(sub) {
    const before = sub.status
    if (['active', 'past_due'].includes(sub.status)) sub.status = this.openInvoices(sub).length ? 'past_due' : 'active'
    if (sub.status !== before) this.emit('customer.subscription.updated', sub, { status: before })
  }
  payInvoice(inv) {
    const paid = this.pay(inv)
    const sub = this.store.subscriptions[inv.parent.subscription_details.subscription]
    if (sub) this.settle(sub)
    return paid
  }

  createSubscription(p) {
    const customer = this.get('customers', p.customer, 'customer', 'customer')
    const specs = Array.isArray(p.items) ? p.items : []
    if (!specs.length) throw invalid('Missing required param: items.', 'items')
    const prices = specs.map((s, i) => this.price(s.price, `items[${i}][price]`))
    if (new Set(prices.map((pr) => `${pr.currency}/${pr.recurring.interval}`)).size > 1) throw invalid('All prices on a subscription must share currency and interval.', 'items')
    const t = this.now()
    const trialEnd = int(p.trial_end) ?? (int(p.trial_period_days) ? t + int(p.trial_period_days) * DAY : null)
    const period = { start: t, end: trialEnd ?? addInterval(t, prices[0].recurring.interval) }
    const id = newId('sub')
    const items = prices.map((price, i) => this.newItem(id, price, int(specs[i].quantity) ?? 1, period))
    const firstCharge = trialEnd ? 0 : Math.max(0, items.reduce((s, i) => s + i.price.unit_amount * i.quantity, 0) + customer.balance)
    if (p.payment_behavior === 'error_if_incomplete' && this.declines(firstCharge)) throw declined()
    // A first payment that is going to fail leaves the subscription incomplete (Stripe's default behaviour).
    const failing = firstCharge > 0 && (this.store.declineAll || this.store.failNext > 0)
    const sub = subscriptionObject({
      id, customer: customer.id, currency: prices[0].currency, items, metadata: mergeMetadata({}, p.metadata), description: p.description,
      status: trialEnd ? 'trialing' : failing ? 'incomplete' : 'active', trialEnd, cancelAtPeriodEnd: bool(p.cancel_at_period_end), created: t, anchor: period.end,
    })
    this.store.subscriptions[id] = sub
    const lines = trialEnd
      ? this.fullLines(sub).map((l) => ({ ...l, amount: 0, subtotal: 0, description: `Trial period for ${l.description}` }))
      : this.fullLines(sub)
    const inv = this.createInvoice(sub, lines, 'subscription_create', period)
    this.emit('customer.subscription.created', sub)
    if (this.pay(inv) && sub.status === 'incomplete') {
      sub.status = 'active'
      this.emit('customer.subscription.updated', sub, { status: 'incomplete' })
    }
    return sub
  }

  updateSubscription(sub, p) {
    if (ENDED.includes(sub.status) && Object.keys(p).some((k) => !['metadata', 'cancellation_details', 'expand'].includes(k)))
      throw invalid('A canceled subscription can only update its cancellation_details and metadata.')
    const proration = p.proration_behavior ?? 'create_prorations'
    if (!['create_prorations', 'always_invoice', 'none'].includes(proration)) throw invalid(`Invalid proration_behavior: ${proration}`, 'proration_behavior')
    const before = structuredClone(sub)
    const pendingBefore = this.store.pendingLines[sub.id]
    let lines
    try {
      this.applyChanges(sub, p)
      lines = this.changeLines(before, sub, p.trial_end === 'now', proration)
      const due = lines ? Math.max(0, sum(lines) + this.store.customers[sub.customer].balance) : 0
      if (p.payment_behavior === 'error_if_incomplete' && this.declines(due)) throw declined()
    } catch (err) {
      // All or nothing, like the real API: a rejected update leaves the subscription as it was.
      Object.assign(sub, before)
      if (pendingBefore) this.store.pendingLines[sub.id] = pendingBefore
      throw err
    }
    const inv = lines ? this.createInvoice(sub, lines, 'subscription_update') : null
    const changed = diff(before, sub)
    if (changed) this.emit('customer.subscription.updated', sub, changed)
    if (inv && !this.pay(inv)) this.settle(sub)
    return sub
  }

  applyChanges(sub, p) {
    const t = this.now()
    sub.metadata = mergeMetadata(sub.metadata, p.metadata)
    if (p.description !== undefined) sub.description = p.description || null
    if (p.cancellation_details) sub.cancellation_details = { ...sub.cancellation_details, ...p.cancellation_details }
    if (p.cancel_at_period_end !== undefined) {
      sub.cancel_at_period_end = bool(p.cancel_at_period_end)
      sub.cancel_at = sub.cancel_at_period_end ? periodOf(sub).end : null
      sub.canceled_at = sub.cancel_at_period_end ? t : null
    }
    ;(Array.isArray(p.items) ? p.items : []).forEach((spec, i) => {
      if (!spec.id) {
        sub.items.data.push(this.newItem(sub.id, this.price(spec.price, `items[${i}][price]`), int(spec.quantity) ?? 1, periodOf(sub)))
        return
      }
      const item = sub.items.data.find((it) => it.id === spec.id)
      if (!item) throw missing('subscription item', spec.id, `items[${i}][id]`)
      if (bool(spec.deleted)) {
        sub.items.data = sub.items.data.filter((it) => it !== item)
        return
      }
      if (spec.price && spec.price !== item.price.id) {
        const replacement = this.newItem(sub.id, this.price(spec.price, `items[${i}][price]`), item.quantity, periodOf(sub))
        Object.assign(item, replacement, { id: item.id, created: item.created })
      }
      if (spec.quantity !== undefined) item.quantity = int(spec.quantity)
    })
    if (!sub.items.data.length) throw invalid('A subscription needs at least one item.', 'items')
    if (new Set(sub.items.data.map((i) => i.price.recurring.interval)).size > 1) throw invalid('All prices on a subscription must share an interval.', 'items')
    sub.items.total_count = sub.items.data.length
  }

  /** Lines to invoice now for a change (null when nothing is invoiced now; prorations may wait). */
  changeLines(before, sub, endTrial, proration) {
    const t = this.now()
    if (sub.status === 'trialing' && !endTrial) return null
    const { start, end } = periodOf(before)
    const unused = Math.min(1, Math.max(0, (end - t) / Math.max(1, end - start)))
    const pending = this.store.pendingLines[sub.id] ?? []
    const credit = (i) => this.line(sub, i, -Math.round(i.price.unit_amount * i.quantity * unused), `Unused time on ${this.seatLabel(i)}`, true)
    const charge = (i) => this.line(sub, i, Math.round(i.price.unit_amount * i.quantity * unused), `Remaining time on ${this.seatLabel(i)}`, true)
    if (endTrial || intervalOf(before) !== intervalOf(sub)) {
      // A new billing period starts now: credit unused paid time and charge the whole new period.
      const credits = sub.status === 'trialing' ? [] : before.items.data.map(credit)
      if (sub.status === 'trialing') Object.assign(sub, { status: 'active', trial_end: t })
      const next = addInterval(t, intervalOf(sub))
      for (const item of sub.items.data) Object.assign(item, { current_period_start: t, current_period_end: next })
      sub.billing_cycle_anchor = next
      delete this.store.pendingLines[sub.id]
      return [...pending, ...credits, ...this.fullLines(sub)]
    }
    if (proration === 'none') return null
    const key = (i) => `${i.id}/${i.price.id}/${i.quantity}`
    const now = new Set(sub.items.data.map(key))
    const was = new Set(before.items.data.map(key))
    const lines = [...before.items.data.filter((i) => !now.has(key(i))).map(credit), ...sub.items.data.filter((i) => !was.has(key(i))).map(charge)]
    if (!lines.length) return null
    if (proration === 'create_prorations') {
      this.store.pendingLines[sub.id] = [...pending, ...lines]
      return null
    }
    delete this.store.pendingLines[sub.id]
    return [...pending, ...lines]
  }

  cancelSubscription(sub, at = this.now()) {
    if (sub.status === 'canceled') throw invalid(`The subscription ${sub.id} is already canceled.`)
    Object.assign(sub, { status: 'canceled', canceled_at: sub.canceled_at ?? at, ended_at: at })
    delete this.store.pendingLines[sub.id]
    this.emit('customer.subscription.deleted', sub)
    return sub
  }

  /** Moves the clock on, then retries, renews or ends every subscription whose period has passed. */
  advance(days) {
    this.store.clockOffset += Math.round(days * DAY)
    const t = this.now()
    for (const sub of Object.values(this.store.subscriptions)) {
      if (sub.status === 'past_due') for (const inv of this.openInvoices(sub)) this.payInvoice(inv)
      for (let guard = 0; guard < 1000 && !ENDED.includes(sub.status) && periodOf(sub).end <= t; guard++) {
        const { start, end } = periodOf(sub)
        if (sub.cancel_at_period_end) {
          this.cancelSubscription(sub, end)
          break
        }
        if (sub.status === 'incomplete') {
          sub.status = 'incomplete_expired'
          this.emit('customer.subscription.updated', sub, { status: 'incomplete' })
          break
        }
        const before = structuredClone(sub)
        for (const item of sub.items.data) Object.assign(item, { current_period_start: end, current_period_end: addInterval(end, intervalOf(sub)) })
        if (sub.status === 'trialing') sub.status = 'active'
        const lines = [...(this.store.pendingLines[sub.id] ?? []), ...this.fullLines(sub)]
        delete this.store.pendingLines[sub.id]
        const inv = this.createInvoice(sub, lines, 'subscription_cycle', { start, end })
        this.pay(inv)
        if (['active', 'past_due'].includes(sub.status)) sub.status = this.openInvoices(sub).length ? 'past_due' : 'active'
        this.emit('customer.subscription.updated', sub, diff(before, sub))
      }
    }
    return { now: t, clock_offset_days: this.store.clockOffset / DAY }
  }

  createCheckoutSession(p) {
    if ((p.mode ?? 'subscription') !== 'subscription') throw invalid('The local fake supports mode=subscription only.', 'mode')
    if (!p.success_url) throw invalid('Missing required param: success_url.', 'success_url')
    if (p.customer) this.get('customers', p.customer, 'customer', 'customer')
    const specs = Array.isArray(p.line_items) ? p.line_items : []
    if (!specs.length) throw invalid('Missing required param: line_items.', 'line_items')
    const lines = specs.map((s, i) => ({ price: this.price(s.price, `line_items[${i}][price]`).id, quantity: int(s.quantity) ?? 1 }))
    const total = lines.reduce((s, l) => s + this.store.prices[l.price].unit_amount * l.quantity, 0)
    const id = newId('cs_test')
    const session = checkoutSessionObject({ id, params: { ...p, metadata: mergeMetadata({}, p.metadata) }, total, currency: this.store.prices[lines[0].price].currency, created: this.now(), baseUrl: this.baseUrl() })
    this.store.checkoutSessions[id] = session
    this.store.checkoutLines[id] = { lines, subscriptionData: p.subscription_data ?? {} }
    return session
  }
  checkoutLineItems(session) {
    return this.store.checkoutLines[session.id].lines.map((l, i) => {
      const price = this.store.prices[l.price]
      const amount = price.unit_amount * l.quantity
      return { id: `li_${session.id.slice(8)}${i}`, object: 'item', amount_discount: 0, amount_subtotal: amount, amount_tax: 0, amount_total: amount, currency: price.currency, description: this.store.products[price.product].name, price, quantity: l.quantity }
    })
  }
  payerEmail(session) {
    return session.customer ? this.store.customers[session.customer]?.email ?? null : session.customer_email
  }
  /** What the hosted page's Pay button does: charge, create the subscription, complete the session. */
  completeCheckout(session, email) {
    if (session.status !== 'open') throw invalid(`This Checkout Session is ${session.status}.`)
    const { lines, subscriptionData } = this.store.checkoutLines[session.id]
    const trialDays = int(subscriptionData.trial_period_days)
    if (!trialDays && this.declines(session.amount_total)) throw declined()
    const customer = session.customer ? this.store.customers[session.customer] : this.createCustomer({ email: session.customer_email ?? email })
    customer.invoice_settings.default_payment_method ??= newId('pm')
    const sub = this.createSubscription({ customer: customer.id, items: lines, metadata: subscriptionData.metadata, trial_period_days: trialDays })
    Object.assign(session, {
      status: 'complete', payment_status: trialDays ? 'no_payment_required' : 'paid', customer: customer.id,
      subscription: sub.id, invoice: sub.latest_invoice,
      customer_details: { address: null, email: customer.email, name: customer.name, phone: null, tax_exempt: 'none', tax_ids: [] },
    })
    this.emit('checkout.session.completed', session)
    return session
  }

  createPortalSession(p) {
    const customer = this.get('customers', p.customer, 'customer', 'customer')
    const portal = portalSessionObject({ customer: customer.id, returnUrl: p.return_url, created: this.now(), baseUrl: this.baseUrl() })
    this.store.portalSessions[portal.id] = portal
    return portal
  }
  portalAction(portal, action, subId) {
    const customer = this.store.customers[portal.customer]
    if (action === 'card') {
      customer.invoice_settings.default_payment_method = newId('pm')
      // A new card is the usual way out of past_due: armed declines are dropped and what is owed is retried.
      Object.assign(this.store, { failNext: 0, declineAll: false })
      for (const sub of this.newestFirst('subscriptions', (s) => s.customer === customer.id && s.status === 'past_due'))
        for (const inv of this.openInvoices(sub)) this.payInvoice(inv)
      return
    }
    const sub = this.get('subscriptions', subId, 'subscription')
    if (sub.customer !== customer.id) throw missing('subscription', subId)
    this.updateSubscription(sub, { cancel_at_period_end: String(action === 'cancel') })
  }
}
