// Webhook events from the payment provider. Each event id is recorded once, in the same transaction as its
// effect: a replay (the provider retries, or someone resends a captured request) finds the id and changes
// nothing, and an event whose handling failed is not recorded, so the provider's retry applies it.
// Handled: checkout.session.completed, customer.subscription.created/updated/deleted, invoice.paid,
// invoice.payment_failed; any other type is recorded as ignored.
import type Stripe from 'stripe'
import { applySubscription, currentSubscription, organisationFor, upsertInvoice } from './billing-stripe'
import { PAYMENT_PROVIDER, record } from './audit'

export type WebhookOutcome = 'applied' | 'ignored' | 'duplicate'

const idOf = (x: string | { id: string } | null | undefined) => (typeof x === 'string' ? x : x?.id ?? null)

interface Plan {
  organisationId: string | null
  subscription: Stripe.Subscription | null
  invoice: Stripe.Invoice | null
}

// Works out the organisation and fetches the objects as they are now. Network calls happen here, before the
// transaction, so no database lock is held while the provider answers.
async function prepare(event: Stripe.Event): Promise<Plan> {
  const none: Plan = { organisationId: null, subscription: null, invoice: null }
  switch (event.type) {
    case 'checkout.session.completed': {
      const session = event.data.object
      if (session.mode !== 'subscription') return none
      const subId = idOf(session.subscription)
      const organisationId = await organisationFor({
        subscriptionId: subId, customerId: idOf(session.customer), metadataOrg: session.client_reference_id ?? session.metadata?.organisation_id,
      })
      return { organisationId, subscription: subId ? await currentSubscription(subId) : null, invoice: null }
    }
    case 'customer.subscription.created':
    case 'customer.subscription.updated':
    case 'customer.subscription.deleted': {
      const payload = event.data.object
      const organisationId = await organisationFor({
        subscriptionId: payload.id, customerId: idOf(payload.customer), metadataOrg: payload.metadata?.organisation_id,
      })
      // The event's copy may be stale (events arrive out of order); the provider's current copy is not.
      return { organisationId, subscription: (await currentSubscription(payload.id)) ?? payload, invoice: null }
    }
    case 'invoice.paid':
    case 'invoice.payment_failed': {
      const payload = event.data.object
      const subId = idOf(payload.parent?.subscription_details?.subscription)
      const organisationId = await organisationFor({
        subscriptionId: subId, customerId: idOf(payload.customer), metadataOrg: payload.parent?.subscription_details?.metadata?.organisation_id,
      })
      if (!organisationId) return none
      const invoice = payload.id ? await useStripe().invoices.retrieve(payload.id).catch(() => payload) : payload
      return { organisationId, subscription: subId ? await currentSubscription(subId) : null, invoice }
    }
    default:
      return none
  }
}

/** Applies one verified event at most once; answers what happened to it. */
export async function handleStripeEvent(event: Stripe.Event): Promise<WebhookOutcome> {
  const db = useDb()
  const seen = await db.selectFrom('stripe_events').select('id').where('id', '=', event.id).executeTakeFirst()
  if (seen) return 'duplicate'
  const plan = await prepare(event)
  return db.transaction().execute(async (trx) => {
    let applied = false
    if (plan.organisationId) {
      if (plan.subscription) applied = (await applySubscription(trx, plan.organisationId, plan.subscription)) || applied
      if (plan.invoice) {
        await upsertInvoice(trx, plan.organisationId, plan.invoice)
        applied = true
        // Once per event: the event id below makes a replay roll this back with everything else.
        if (event.type === 'invoice.payment_failed') {
          await record(trx, {
            organisationId: plan.organisationId, actor: PAYMENT_PROVIDER, action: 'billing.invoice_payment_failed',
            target: { kind: 'invoice', id: plan.invoice.id ?? null, label: plan.invoice.number ?? plan.invoice.id ?? '' },
            details: { amount: plan.invoice.amount_due, currency: plan.invoice.currency, attempt: plan.invoice.attempt_count },
          })
        }
      }
    }
    const outcome = applied ? 'applied' : 'ignored'
    // Recorded last but in the same transaction: a concurrent delivery of the same event fails on the key
    // and rolls its own work back, so the effect happens once.
    const inserted = await trx.insertInto('stripe_events')
      .values({ id: event.id, type: event.type, organisation_id: plan.organisationId, outcome, stripe_created_at: new Date(event.created * 1000) })
      .onConflict((oc) => oc.column('id').doNothing())
      .returning('id')
      .executeTakeFirst()
    if (!inserted) throw new DuplicateEvent()
    return outcome
  }).catch((err) => {
    if (err instanceof DuplicateEvent) return 'duplicate' as const
    throw err
  })
}

class DuplicateEvent extends Error {}
