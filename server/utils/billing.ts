import type { Kysely, Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import { can, type Role } from '#shared/permissions'
import { PLANS, TRIAL_DAYS, TRIAL_SEATS, type BillingInterval, type PlanKey } from '#shared/billing/plans'
import { addDays, standingOf, type Standing, type SubscriptionStatus } from '#shared/billing/standing'

type Db = Kysely<Database> | Transaction<Database>

/** The organisation's billing facts as stored (or implied, for an organisation without a billing row). */
export interface BillingState {
  organisationId: string
  plan: PlanKey
  interval: BillingInterval | null
  status: SubscriptionStatus
  seatsPaid: number
  trialEndsAt: Date | null
  currentPeriodEnd: Date | null
  graceUntil: Date | null
  cancelAtPeriodEnd: boolean
  endedAt: Date | null
  stripeCustomerId: string | null
  stripeSubscriptionId: string | null
  version: number
}

/**
 * Reads an organisation's billing state. An organisation created without a billing row (by a script or an
 * older code path) is treated as being on the trial from the day it was created, so it is never locked
 * out by a missing row.
 */
export async function billingStateOf(db: Db, organisationId: string, lock = false): Promise<BillingState> {
  let q = db
    .selectFrom('organisation_billing')
    .selectAll()
    .where('organisation_id', '=', organisationId)
  if (lock) q = q.forUpdate()
  const row = await q.executeTakeFirst()
  if (row) {
    return {
      organisationId,
      plan: row.plan,
      interval: row.billing_interval,
      status: row.status,
      seatsPaid: row.seats_paid,
      trialEndsAt: row.trial_ends_at,
      currentPeriodEnd: row.current_period_end,
      graceUntil: row.grace_until,
      cancelAtPeriodEnd: row.cancel_at_period_end,
      endedAt: row.ended_at,
      stripeCustomerId: row.stripe_customer_id,
      stripeSubscriptionId: row.stripe_subscription_id,
      version: row.version,
    }
  }
  const org = await db.selectFrom('organisations').select('created_at').where('id', '=', organisationId).executeTakeFirst()
  return {
    organisationId,
    plan: 'trial',
    interval: null,
    status: 'trialing',
    seatsPaid: TRIAL_SEATS,
    trialEndsAt: addDays(org?.created_at ?? new Date(), TRIAL_DAYS),
    currentPeriodEnd: null,
    graceUntil: null,
    cancelAtPeriodEnd: false,
    endedAt: null,
    stripeCustomerId: null,
    stripeSubscriptionId: null,
    version: 0,
  }
}

/** The standing (trial, active, grace, read-only) of a billing state at `now`. */
export function standingFor(state: BillingState, now = new Date()): Standing {
  return standingOf(
    { status: state.status, subscribed: !!state.stripeSubscriptionId, trialEndsAt: state.trialEndsAt, graceUntil: state.graceUntil },
    now,
  )
}

/** One sentence on why an organisation is read-only (or will be), for banners and 402 answers. */
export function lapseSentence(standing: Standing, plan: PlanKey): string {
  if (standing.reason === 'trial_ended') return 'its trial has ended'
  if (standing.reason === 'payment_failed') return `a payment for the ${PLANS[plan].name} plan failed`
  if (standing.reason === 'ended') return 'its subscription has ended'
  return 'its subscription is not paid'
}

/**
 * Refuses a change with 402 while the organisation is read-only after a lapse. Called by requireMember for
 * every non-GET organisation route, so no write route can forget it; billing routes opt out so that the
 * owner can pay.
 */
export async function assertWritable(org: { id: string; name: string }, role: Role): Promise<void> {
  const state = await billingStateOf(useDb(), org.id)
  const standing = standingFor(state)
  if (!standing.readOnly) return
  const remedy = can(role, 'billing.manage')
    ? 'Choose a plan or update the card on the Billing page to edit again.'
    : 'An owner can restore editing from the Billing page.'
  throw createError({
    statusCode: 402,
    statusMessage: 'Read-only',
    data: {
      message: `${org.name} is read-only because ${lapseSentence(standing, state.plan)}. Everything is kept and can still be viewed and exported. ${remedy}`,
      readOnly: true,
    },
  })
}
