// Everything that talks to the payment provider: the catalogue, Checkout, the portal, seat changes,
// cancellation, and turning a provider subscription or invoice into our stored state.
import type { Transaction } from 'kysely'
import type Stripe from 'stripe'
import type { Database } from '~~/db/database'
import {
  GRACE_DAYS, PLANS, isPlanKey, lookupKey, parseLookupKey, seatPrice, seatsUsed,
  type BillingInterval, type PaidPlanKey, type PlanKey,
} from '#shared/billing/plans'
import { SUBSCRIPTION_STATUSES, addDays, type SubscriptionStatus } from '#shared/billing/standing'
import type { BillingSummary } from '#shared/types/billing'
import { billingSummary, hasLiveSubscription, lockBilling, seatUsageOf, touched } from './billing'
import { PAYMENT_PROVIDER, actorOf, changesOf, record, type AuditActor } from './audit'

const LAPSING: SubscriptionStatus[] = ['past_due', 'unpaid', 'incomplete']
const ENDED: SubscriptionStatus[] = ['canceled', 'incomplete_expired']
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

const fromUnix = (t: number | null | undefined) => (t ? new Date(t * 1000) : null)
const idOf = (x: string | { id: string } | null | undefined) => (typeof x === 'string' ? x : x?.id ?? null)

// Prices rarely change; one lookup per process and price is enough.
const priceCache = new Map<string, Stripe.Price>()

/** The provider's price for a plan and interval, checked against our own figures before anything is sold. */
export async function priceFor(plan: PaidPlanKey, interval: BillingInterval): Promise<Stripe.Price> {
  const key = lookupKey(plan, interval)
  const cached = priceCache.get(key)
  if (cached) return cached
  let price: Stripe.Price | undefined
  try {
    price = (await useStripe().prices.list({ lookup_keys: [key], active: true, limit: 1 })).data[0]
  } catch (err) {
    throw stripeFailure(err, 'look up the plan price')
  }
  const expected = seatPrice(plan, interval)
  if (!price || price.unit_amount !== expected.amount || price.currency !== expected.currency) {
    // Selling at a price other than the one shown would be wrong either way: refuse and say so in the log.
    console.error(`[billing] catalogue mismatch for ${key}: provider ${price?.unit_amount} ${price?.currency}, ours ${expected.amount} ${expected.currency}`)
    throw createError({
      statusCode: 503,
      statusMessage: 'Plan unavailable',
      data: { message: `The ${PLANS[plan].name} plan cannot be bought at the moment. Nothing was charged; please contact support.` },
    })
  }
  priceCache.set(key, price)
  return price
}

function subscriptionStatus(s: string): SubscriptionStatus {
  return (SUBSCRIPTION_STATUSES as readonly string[]).includes(s) ? (s as SubscriptionStatus) : 'incomplete'
}

function planOf(price: Stripe.Price, fallback: PlanKey): { plan: PlanKey; interval: BillingInterval | null } {
  const parsed = parseLookupKey(price.lookup_key)
  if (parsed) return parsed
  const interval = price.recurring?.interval === 'year' ? 'year' : price.recurring?.interval === 'month' ? 'month' : null
  return { plan: isPlanKey(price.metadata?.plan) ? price.metadata.plan : fallback, interval }
}

/**
 * Stores what a provider subscription says, inside the caller's transaction. Callers pass the subscription as
 * fetched just now (never an event's copy), so events that arrive late or out of order cannot roll the state
 * back. An ended subscription that is no longer the organisation's current one is history and is ignored.
 */
export async function applySubscription(
  trx: Transaction<Database>, organisationId: string, sub: Stripe.Subscription, actor: AuditActor | null = PAYMENT_PROVIDER,
): Promise<boolean> {
  const state = await lockBilling(trx, organisationId)
  const status = subscriptionStatus(sub.status)
  if (state.stripeSubscriptionId && state.stripeSubscriptionId !== sub.id && ENDED.includes(status)) return false
  const item = sub.items.data[0]
  if (!item) return false
  const { plan, interval } = planOf(item.price, state.plan)
  const now = new Date()
  const graceUntil = LAPSING.includes(status) ? state.graceUntil ?? addDays(now, GRACE_DAYS) : ENDED.includes(status) ? state.graceUntil : null
  const cancelAtPeriodEnd = sub.cancel_at_period_end || (!!sub.cancel_at && !ENDED.includes(status))
  // The audit log gets one entry per real change, whoever applies it first (the webhook or the page's own sync);
  // a later copy of the same state finds nothing changed and records nothing.
  const changes = changesOf(
    { plan: state.plan, interval: state.interval, status: state.status, seats: state.seatsPaid, cancelAtPeriodEnd: state.cancelAtPeriodEnd },
    { plan, interval, status, seats: item.quantity ?? 1, cancelAtPeriodEnd },
  )
  if (Object.keys(changes).length) {
    await record(trx, {
      organisationId, actor, action: 'billing.subscription_changed',
      target: { kind: 'subscription', id: sub.id, label: PLANS[plan].name }, details: { changes },
    })
  }
  await trx.updateTable('organisation_billing')
    .set({
      plan,
      billing_interval: interval,
      status,
      seats_paid: item.quantity ?? 1,
      current_period_end: fromUnix(item.current_period_end),
      cancel_at_period_end: cancelAtPeriodEnd,
      ended_at: fromUnix(sub.ended_at),
      grace_until: graceUntil,
      stripe_subscription_id: sub.id,
      stripe_customer_id: idOf(sub.customer) ?? state.stripeCustomerId,
      synced_at: now,
      ...touched(),
    })
    .where('organisation_id', '=', organisationId)
    .execute()
  return true
}

/** Stores or refreshes one invoice in the organisation's invoice list. */
export async function upsertInvoice(
  trx: Transaction<Database>, organisationId: string, inv: Stripe.Invoice, actor: AuditActor | null = PAYMENT_PROVIDER,
): Promise<void> {
  if (!inv.id) return
  const before = await trx.selectFrom('billing_invoices').select('status')
    .where('organisation_id', '=', organisationId).where('stripe_invoice_id', '=', inv.id).executeTakeFirst()
  // Paid is recorded once: when the stored invoice first turns paid.
  if (inv.status === 'paid' && before?.status !== 'paid') {
    await record(trx, {
      organisationId, actor, action: 'billing.invoice_paid', target: { kind: 'invoice', id: inv.id, label: inv.number ?? inv.id },
      details: { amount: inv.amount_paid, currency: inv.currency, reason: inv.billing_reason },
    })
  }
  const values = {
    organisation_id: organisationId,
    stripe_invoice_id: inv.id,
    number: inv.number,
    status: inv.status ?? 'draft',
    currency: inv.currency,
    total: inv.total,
    amount_due: inv.amount_due,
    amount_paid: inv.amount_paid,
    billing_reason: inv.billing_reason,
    hosted_url: inv.hosted_invoice_url ?? null,
    pdf_url: inv.invoice_pdf ?? null,
    period_start: fromUnix(inv.period_start),
    period_end: fromUnix(inv.period_end),
    issued_at: fromUnix(inv.created) ?? new Date(),
  }
  await trx.insertInto('billing_invoices').values(values)
    .onConflict((oc) => oc.column('stripe_invoice_id').doUpdateSet({
      status: values.status, amount_due: values.amount_due, amount_paid: values.amount_paid, total: values.total,
      number: values.number, hosted_url: values.hosted_url, pdf_url: values.pdf_url, updated_at: new Date(),
    }).where('billing_invoices.organisation_id', '=', organisationId))
    .execute()
}

/** The organisation an event's objects belong to: by subscription, then customer, then our own metadata. */
export async function organisationFor(ref: { subscriptionId?: string | null; customerId?: string | null; metadataOrg?: string | null }): Promise<string | null> {
  const db = useDb()
  if (ref.subscriptionId) {
    const row = await db.selectFrom('organisation_billing').select('organisation_id').where('stripe_subscription_id', '=', ref.subscriptionId).executeTakeFirst()
    if (row) return row.organisation_id
  }
  if (ref.customerId) {
    const row = await db.selectFrom('organisation_billing').select('organisation_id').where('stripe_customer_id', '=', ref.customerId).executeTakeFirst()
    if (row) return row.organisation_id
  }
  if (ref.metadataOrg && UUID.test(ref.metadataOrg)) {
    const row = await db.selectFrom('organisations').select('id').where('id', '=', ref.metadataOrg).executeTakeFirst()
    if (row) return row.id
  }
  return null
}

/** Fetches a subscription as it is now; null when the provider no longer has it. */
export async function currentSubscription(id: string): Promise<Stripe.Subscription | null> {
  try {
    return await useStripe().subscriptions.retrieve(id)
  } catch (err) {
    if ((err as { code?: string }).code === 'resource_missing') return null
    throw stripeFailure(err, 'read the subscription')
  }
}

async function customerFor(ctx: MemberContext): Promise<string> {
  const db = useDb()
  const existing = await db.selectFrom('organisation_billing').select('stripe_customer_id').where('organisation_id', '=', ctx.org.id).executeTakeFirst()
  if (existing?.stripe_customer_id) return existing.stripe_customer_id
  let customer: Stripe.Customer
  try {
    // The idempotency key makes two simultaneous first checkouts share one customer.
    customer = await useStripe().customers.create(
      { email: ctx.user.email, name: ctx.org.name, metadata: { organisation_id: ctx.org.id } },
      { idempotencyKey: `greybody-customer-${ctx.org.id}` },
    )
  } catch (err) {
    throw stripeFailure(err, 'set up the customer')
  }
  await db.transaction().execute(async (trx) => {
    await lockBilling(trx, ctx.org.id)
    await trx.updateTable('organisation_billing').set({ stripe_customer_id: customer.id, ...touched() })
      .where('organisation_id', '=', ctx.org.id).where('stripe_customer_id', 'is', null).execute()
  })
  const row = await db.selectFrom('organisation_billing').select('stripe_customer_id').where('organisation_id', '=', ctx.org.id).executeTakeFirstOrThrow()
  return row.stripe_customer_id!
}

function conflict(message: string, fieldErrors?: Record<string, string[]>) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', data: { message, ...(fieldErrors ? { fieldErrors } : {}) } })
}

/** Opens a Checkout session for a plan, interval and number of seats; answers the page to send the owner to. */
export async function startCheckout(ctx: MemberContext, input: { plan: PaidPlanKey; interval: BillingInterval; seats: number }) {
  const state = await billingStateOf(useDb(), ctx.org.id)
  if (hasLiveSubscription(state)) {
    throw conflict(`${ctx.org.name} already has a subscription. Change seats here, or change the plan or card in the billing portal.`)
  }
  const used = seatsUsed(await seatUsageOf(useDb(), ctx.org.id, state.seatsPaid))
  if (input.seats < used) {
    const message = `${used} seats are in use (members with an editing role and pending invitations for one). Choose at least ${used}.`
    throw conflict(message, { seats: [message] })
  }
  const price = await priceFor(input.plan, input.interval)
  const customer = await customerFor(ctx)
  const back = `/orgs/${ctx.org.slug}/billing`
  try {
    const session = await useStripe().checkout.sessions.create({
      mode: 'subscription',
      customer,
      client_reference_id: ctx.org.id,
      line_items: [{ price: price.id, quantity: input.seats }],
      metadata: { organisation_id: ctx.org.id },
      subscription_data: { metadata: { organisation_id: ctx.org.id, plan: input.plan } },
      // The provider replaces {CHECKOUT_SESSION_ID}; the page then confirms the outcome with the server.
      success_url: `${appLink(back)}?checkout=done&session={CHECKOUT_SESSION_ID}`,
      cancel_url: `${appLink(back)}?checkout=cancelled`,
    })
    if (!session.url) throw new Error('Checkout session without a URL')
    await record(useDb(), {
      ctx, action: 'billing.checkout_started', target: { kind: 'subscription', id: null, label: PLANS[input.plan].name },
      details: { plan: input.plan, interval: input.interval, seats: input.seats, session: session.id },
    })
    return { url: session.url, sessionId: session.id }
  } catch (err) {
    throw stripeFailure(err, 'open the checkout')
  }
}

/**
 * After Checkout the page passes the session id: if it is complete, store its subscription now rather than
 * wait for the webhook, so the owner sees the result at once. Only a session made for this organisation counts.
 */
export async function syncCheckout(ctx: MemberContext, sessionId: string): Promise<NonNullable<BillingSummary['checkout']>> {
  let session: Stripe.Checkout.Session
  try {
    session = await useStripe().checkout.sessions.retrieve(sessionId)
  } catch (err) {
    if ((err as { code?: string }).code === 'resource_missing') return { status: 'unknown' }
    throw stripeFailure(err, 'read the checkout')
  }
  if (session.client_reference_id !== ctx.org.id) return { status: 'unknown' }
  const subId = idOf(session.subscription)
  if (session.status === 'complete' && subId) {
    const sub = await currentSubscription(subId)
    const invoices = await useStripe().invoices.list({ subscription: subId, limit: 10 }).catch(() => null)
    await useDb().transaction().execute(async (trx) => {
      if (sub) await applySubscription(trx, ctx.org.id, sub, actorOf(ctx))
      for (const inv of invoices?.data ?? []) await upsertInvoice(trx, ctx.org.id, inv, actorOf(ctx))
    })
  }
  const known = ['open', 'complete', 'expired'] as const
  const status = known.find((k) => k === session.status) ?? 'unknown'
  return { status }
}

/** A billing portal session (card, cancel or resume at the provider); answers its URL. */
export async function openPortal(ctx: MemberContext) {
  const state = await billingStateOf(useDb(), ctx.org.id)
  if (!state.stripeCustomerId) throw conflict(`${ctx.org.name} has not subscribed yet: choose a plan first.`)
  try {
    const portal = await useStripe().billingPortal.sessions.create({
      customer: state.stripeCustomerId,
      return_url: appLink(`/orgs/${ctx.org.slug}/billing`),
    })
    await record(useDb(), { ctx, action: 'billing.portal_opened', target: { kind: 'subscription', id: state.stripeSubscriptionId, label: PLANS[state.plan].name } })
    return { url: portal.url }
  } catch (err) {
    throw stripeFailure(err, 'open the billing portal')
  }
}

async function liveSubscriptionOf(ctx: MemberContext) {
  const state = await billingStateOf(useDb(), ctx.org.id)
  if (!hasLiveSubscription(state)) {
    throw conflict(state.plan === 'trial'
      ? `${ctx.org.name} is on the trial, which has a fixed number of seats. Choose a plan to set your own.`
      : `${ctx.org.name} has no running subscription. Choose a plan first.`)
  }
  const sub = await currentSubscription(state.stripeSubscriptionId!)
  if (!sub || !sub.items.data[0]) throw conflict('The subscription could not be found at the payment provider. Reload the page.')
  return { state, sub, item: sub.items.data[0] }
}

/**
 * Sets the number of seats. More seats are invoiced at once for the rest of the period (prorated) and the
 * change is refused without any effect if that payment is declined; fewer seats leave a credit for the next invoice.
 */
export async function changeSeats(ctx: MemberContext, seats: number) {
  const { state, sub, item } = await liveSubscriptionOf(ctx)
  const used = seatsUsed(await seatUsageOf(useDb(), ctx.org.id, state.seatsPaid))
  if (seats < used) {
    const message = `${used} seats are in use. Remove members, change them to viewers or withdraw invitations before going below ${used}.`
    throw conflict(message, { seats: [message] })
  }
  let updated = sub
  if (item.quantity !== seats) {
    try {
      updated = await useStripe().subscriptions.update(sub.id, {
        items: [{ id: item.id, quantity: seats }],
        proration_behavior: 'always_invoice',
        payment_behavior: 'error_if_incomplete',
      })
    } catch (err) {
      throw stripeFailure(err, 'change the seats')
    }
  }
  const invoiceId = idOf(updated.latest_invoice)
  const invoice = invoiceId && item.quantity !== seats ? await useStripe().invoices.retrieve(invoiceId).catch(() => null) : null
  await useDb().transaction().execute(async (trx) => {
    if (item.quantity !== seats) {
      await record(trx, {
        ctx, action: 'billing.seats_changed', target: { kind: 'subscription', id: sub.id, label: PLANS[state.plan].name },
        details: { from: item.quantity, to: seats, ...(invoice && { invoice: invoice.id, invoiceTotal: invoice.total, currency: invoice.currency }) },
      })
    }
    await applySubscription(trx, ctx.org.id, updated, actorOf(ctx))
    if (invoice) await upsertInvoice(trx, ctx.org.id, invoice, actorOf(ctx))
  })
  return { summary: await billingSummary(ctx), prorationInvoice: invoice ? { id: invoice.id, total: invoice.total, currency: invoice.currency } : null }
}

/** Cancels at the end of the paid period: nothing stops before then, and no refund is made. */
export async function cancelAtPeriodEnd(ctx: MemberContext): Promise<BillingSummary> {
  const { state, sub } = await liveSubscriptionOf(ctx)
  let updated = sub
  if (!sub.cancel_at_period_end) {
    try {
      updated = await useStripe().subscriptions.update(sub.id, { cancel_at_period_end: true })
    } catch (err) {
      throw stripeFailure(err, 'cancel the subscription')
    }
  }
  await useDb().transaction().execute(async (trx) => {
    if (!sub.cancel_at_period_end) {
      await record(trx, { ctx, action: 'billing.cancel_requested', target: { kind: 'subscription', id: sub.id, label: PLANS[state.plan].name } })
    }
    await applySubscription(trx, ctx.org.id, updated, actorOf(ctx))
  })
  return billingSummary(ctx)
}
