// Stripe object shapes produced by the local fake (API version of the installed `stripe` SDK: billing
// periods live on subscription items, an invoice points at its subscription through `parent`).
// Only the fields Greybody could plausibly read are meaningful; the rest carry Stripe's neutral defaults.
import { randomBytes } from 'node:crypto'
import Stripe from 'stripe'

export const DAY = 86_400

const ALNUM = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789'

/** A Stripe-looking id such as `cus_Q3x…`. */
export const newId = (/** @type {string} */ prefix) => `${prefix}_${[...randomBytes(16)].map((b) => ALNUM[b % 62]).join('')}`

/** Error answered in Stripe's `{ error: { type, message, code, param } }` shape. */
export class StripeFakeError extends Error {
  /** @param {number} status @param {string} message @param {{ type?: string, code?: string, param?: string, decline_code?: string }} [extra] */
  constructor(status, message, extra = {}) {
    super(message)
    this.status = status
    this.body = { error: { type: extra.type ?? 'invalid_request_error', message, ...extra } }
  }
}

export const missing = (kind, id, param = 'id') =>
  new StripeFakeError(404, `No such ${kind}: '${id}'`, { code: 'resource_missing', param })

export const invalid = (message, param) => new StripeFakeError(400, message, param ? { param } : {})

export const declined = () =>
  new StripeFakeError(402, 'Your card was declined.', { type: 'card_error', code: 'card_declined', decline_code: 'generic_decline' })

/** Adds calendar months/years (or days/weeks) to a Unix timestamp, as Stripe's billing anchors do. */
export function addInterval(ts, interval, count = 1) {
  const d = new Date(ts * 1000)
  if (interval === 'year') d.setUTCFullYear(d.getUTCFullYear() + count)
  else if (interval === 'month') d.setUTCMonth(d.getUTCMonth() + count)
  else d.setUTCDate(d.getUTCDate() + count * (interval === 'week' ? 7 : 1))
  return Math.floor(d.getTime() / 1000)
}

export function productObject({ key, name, description, defaultPrice, created }) {
  return {
    id: `prod_${key}`, object: 'product', active: true, created, updated: created, default_price: defaultPrice,
    description, images: [], livemode: false, marketing_features: [], metadata: { plan: key }, name,
    package_dimensions: null, shippable: null, statement_descriptor: null, tax_code: null, type: 'service',
    unit_label: 'seat', url: null,
  }
}

export function priceObject({ planKey, planName, interval, amount, currency, created }) {
  const lookupKey = `${planKey}_${interval}ly`
  return {
    id: `price_${lookupKey}`, object: 'price', active: true, billing_scheme: 'per_unit', created, currency,
    custom_unit_amount: null, livemode: false, lookup_key: lookupKey, metadata: { plan: planKey },
    nickname: `${planName} (${interval}ly, per seat)`, product: `prod_${planKey}`,
    recurring: { interval, interval_count: 1, meter: null, trial_period_days: null, usage_type: 'licensed' },
    tax_behavior: 'unspecified', tiers_mode: null, transform_quantity: null, type: 'recurring',
    unit_amount: amount, unit_amount_decimal: String(amount),
  }
}

export function customerObject({ email, name, description, phone, metadata, paymentMethod, created }) {
  return {
    id: newId('cus'), object: 'customer', address: null, balance: 0, created, currency: null, default_source: null,
    delinquent: false, description: description || null, discount: null, email: email || null,
    invoice_prefix: randomBytes(4).toString('hex').toUpperCase(),
    invoice_settings: { custom_fields: null, default_payment_method: paymentMethod || null, footer: null, rendering_options: null },
    livemode: false, metadata, name: name || null, phone: phone || null, preferred_locales: [], shipping: null,
    tax_exempt: 'none', test_clock: null,
  }
}

export function subscriptionItemObject({ subscription, price, quantity, period, created }) {
  // `plan` is the legacy mirror of `price` that Stripe still returns on items.
  const plan = {
    id: price.id, object: 'plan', active: true, amount: price.unit_amount, amount_decimal: price.unit_amount_decimal,
    billing_scheme: 'per_unit', created: price.created, currency: price.currency, interval: price.recurring.interval,
    interval_count: 1, livemode: false, metadata: price.metadata, meter: null, nickname: price.nickname,
    product: price.product, tiers_mode: null, transform_usage: null, trial_period_days: null, usage_type: 'licensed',
  }
  return {
    id: newId('si'), object: 'subscription_item', billing_thresholds: null, created,
    current_period_start: period.start, current_period_end: period.end, discounts: [], metadata: {},
    plan, price: structuredClone(price), quantity, subscription, tax_rates: [],
  }
}

export function subscriptionObject({ id, customer, currency, items, metadata, description, status, trialEnd, cancelAtPeriodEnd, created, anchor }) {
  return {
    id, object: 'subscription', application: null, application_fee_percent: null,
    automatic_tax: { disabled_reason: null, enabled: false, liability: null },
    billing_cycle_anchor: anchor, billing_cycle_anchor_config: null,
    billing_mode: { flexible: null, type: 'flexible', updated_at: created }, billing_schedules: [], billing_thresholds: null,
    cancel_at: cancelAtPeriodEnd ? items[0].current_period_end : null, cancel_at_period_end: cancelAtPeriodEnd,
    canceled_at: null, cancellation_details: { comment: null, feedback: null, reason: null },
    collection_method: 'charge_automatically', created, currency, customer, customer_account: null,
    days_until_due: null, default_payment_method: null, default_source: null, description: description || null,
    discounts: [], ended_at: null, invoice_settings: { account_tax_ids: null, issuer: { type: 'self' } },
    items: { object: 'list', data: items, has_more: false, total_count: items.length, url: `/v1/subscription_items?subscription=${id}` },
    latest_invoice: null, livemode: false, managed_payments: null, metadata, next_pending_invoice_item_invoice: null,
    on_behalf_of: null, pause_collection: null,
    payment_settings: { payment_method_options: null, payment_method_types: null, save_default_payment_method: 'off' },
    pending_invoice_item_interval: null, pending_setup_intent: null, pending_update: null, schedule: null,
    start_date: created, status, test_clock: null, transfer_data: null, trial_end: trialEnd,
    trial_settings: { end_behavior: { missing_payment_method: 'create_invoice' } }, trial_start: trialEnd ? created : null,
  }
}

export function invoiceLineObject({ subscription, item, amount, description, proration, period }) {
  return {
    id: newId('il'), object: 'line_item', amount, currency: item.price.currency, description,
    discount_amounts: [], discountable: true, discounts: [], invoice: null, livemode: false, metadata: {},
    parent: {
      type: 'subscription_item_details', invoice_item_details: null,
      subscription_item_details: { invoice_item: null, proration, proration_details: { credited_items: null }, subscription, subscription_item: item.id },
    },
    period: { ...period }, pretax_credit_amounts: [],
    pricing: { type: 'price_details', price_details: { price: item.price.id, product: item.price.product }, unit_amount_decimal: item.price.unit_amount_decimal },
    quantity: item.quantity, subscription, subtotal: amount, taxes: [],
  }
}

export function invoiceObject({ id, number, sub, customer, lines, reason, amountDue, startingBalance, period, created, baseUrl }) {
  const total = lines.reduce((s, l) => s + l.amount, 0)
  return {
    id, object: 'invoice', account_country: 'US', account_name: 'Greybody (local fake)', account_tax_ids: null,
    amount_due: amountDue, amount_overpaid: 0, amount_paid: 0, amount_remaining: amountDue, amount_shipping: 0,
    application: null, attempt_count: 0, attempted: false, auto_advance: false,
    automatic_tax: { disabled_reason: null, enabled: false, liability: null, provider: null, status: null },
    automatically_finalizes_at: null, billing_reason: reason, collection_method: 'charge_automatically', created,
    currency: sub.currency, custom_fields: null, customer: customer.id, customer_account: null, customer_address: null,
    customer_email: customer.email, customer_name: customer.name, customer_phone: null, customer_shipping: null,
    customer_tax_exempt: 'none', default_payment_method: null, default_source: null, default_tax_rates: [],
    description: null, discounts: [], due_date: null, effective_at: created, ending_balance: customer.balance,
    footer: null, from_invoice: null, hosted_invoice_url: `${baseUrl}/invoices/${id}`,
    invoice_pdf: `${baseUrl}/invoices/${id}?format=print`, issuer: { type: 'self' }, last_finalization_error: null,
    latest_revision: null, lines: { object: 'list', data: lines, has_more: false, total_count: lines.length, url: `/v1/invoices/${id}/lines` },
    livemode: false, metadata: {}, next_payment_attempt: null, number, on_behalf_of: null,
    parent: { type: 'subscription_details', quote_details: null, subscription_details: { metadata: sub.metadata, subscription: sub.id } },
    payment_settings: { default_mandate: null, payment_method_options: null, payment_method_types: null },
    period_start: period.start, period_end: period.end, post_payment_credit_notes_amount: 0,
    pre_payment_credit_notes_amount: 0, receipt_number: null, rendering: null, shipping_cost: null,
    shipping_details: null, starting_balance: startingBalance, statement_descriptor: null, status: 'open',
    status_transitions: { finalized_at: created, marked_uncollectible_at: null, paid_at: null, voided_at: null },
    subtotal: total, subtotal_excluding_tax: total, test_clock: null, total, total_discount_amounts: [],
    total_excluding_tax: total, total_pretax_credit_amounts: [], total_taxes: [], webhooks_delivered_at: created,
  }
}

export function checkoutSessionObject({ id, params, total, currency, created, baseUrl }) {
  return {
    id, object: 'checkout.session', after_expiration: null, allow_promotion_codes: null,
    amount_subtotal: total, amount_total: total, automatic_tax: { enabled: false, liability: null, status: null },
    billing_address_collection: null, cancel_url: params.cancel_url ?? null,
    client_reference_id: params.client_reference_id ?? null, created, currency, customer: params.customer ?? null,
    customer_creation: params.customer ? null : 'always', customer_details: null,
    customer_email: params.customer_email ?? null, expires_at: created + DAY, invoice: null, livemode: false,
    locale: null, metadata: params.metadata, mode: 'subscription', payment_intent: null,
    payment_method_types: ['card'], payment_status: 'unpaid', status: 'open', subscription: null,
    success_url: params.success_url.replaceAll('{CHECKOUT_SESSION_ID}', id),
    total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 }, ui_mode: 'hosted',
    url: `${baseUrl}/checkout/${id}`,
  }
}

export function portalSessionObject({ customer, returnUrl, created, baseUrl }) {
  const id = newId('bps')
  return {
    id, object: 'billing_portal.session', configuration: 'bpc_local', created, customer, flow: null,
    livemode: false, locale: null, on_behalf_of: null, return_url: returnUrl ?? null, url: `${baseUrl}/portal/${id}`,
  }
}

export function eventObject({ type, object, previous, created }) {
  return {
    id: newId('evt'), object: 'event', api_version: Stripe.API_VERSION, created,
    data: { object: structuredClone(object), ...(previous ? { previous_attributes: previous } : {}) },
    livemode: false, pending_webhooks: 1, request: { id: null, idempotency_key: null }, type,
  }
}
