import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import { ROLE_LABELS, can, type Role } from '#shared/permissions'
import {
  PLANS, SEAT_ROLES, TRIAL_DAYS, TRIAL_SEATS, seatPrice, seatsFree, seatsShort, seatsUsed, subscriptionTotal, takesSeat,
  type SeatUsage,
} from '#shared/billing/plans'
import { addDays } from '#shared/billing/standing'
import type { BillingInvoicePage, BillingStandingView, BillingSummary } from '#shared/types/billing'
import { storedBytes } from './plan-limits'

type Db = Kysely<Database> | Transaction<Database>

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null)

/** Starts a new organisation's trial, inside the caller's transaction. */
export async function startTrial(trx: Transaction<Database>, organisationId: string, now = new Date()) {
  await trx.insertInto('organisation_billing')
    .values({ organisation_id: organisationId, plan: 'trial', status: 'trialing', seats_paid: TRIAL_SEATS, trial_ends_at: addDays(now, TRIAL_DAYS) })
    .onConflict((oc) => oc.column('organisation_id').doNothing())
    .execute()
}

/**
 * Locks the organisation's billing row for the rest of the transaction (creating the implied trial row if an
 * older organisation has none), so that two seat-taking changes cannot both take the last seat.
 */
export async function lockBilling(trx: Transaction<Database>, organisationId: string) {
  const implied = await billingStateOf(trx, organisationId)
  if (implied.version === 0) {
    await trx.insertInto('organisation_billing')
      .values({ organisation_id: organisationId, plan: 'trial', status: 'trialing', seats_paid: TRIAL_SEATS, trial_ends_at: implied.trialEndsAt })
      .onConflict((oc) => oc.column('organisation_id').doNothing())
      .execute()
  }
  return billingStateOf(trx, organisationId, true)
}

/** Seats the organisation has and how many are taken (members with an editing role, pending invitations for one). */
export async function seatUsageOf(db: Db, organisationId: string, paid: number): Promise<SeatUsage> {
  const [members, pending] = await Promise.all([
    db.selectFrom('memberships').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', organisationId).where('removed_at', 'is', null).where('role', 'in', [...SEAT_ROLES])
      .executeTakeFirstOrThrow(),
    db.selectFrom('invitations').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', organisationId).where('status', '=', 'pending').where('role', 'in', [...SEAT_ROLES])
      .executeTakeFirstOrThrow(),
  ])
  return { paid, members: Number(members.n), pending: Number(pending.n) }
}

/**
 * Refuses (402) to give one more person an editing role when every seat is taken. `actorRole` decides the
 * wording: an owner is told how to add seats, anyone else to ask an owner. `countPending: false` is for
 * accepting an invitation, whose own pending seat becomes the member's; `adding: 0` when the caller has already
 * inserted the seat-taking row in this transaction (it is then counted like the others).
 */
export async function assertSeatFor(
  trx: Transaction<Database>,
  org: { id: string; name: string },
  role: Role,
  actorRole: Role | null,
  opts: { countPending?: boolean; adding?: number } = {},
): Promise<void> {
  if (!takesSeat(role)) return
  const state = await lockBilling(trx, org.id)
  const usage = await seatUsageOf(trx, org.id, state.seatsPaid)
  if (opts.countPending === false) usage.pending = 0
  const adding = opts.adding ?? 1
  const short = seatsShort(usage, adding)
  if (short === 0) return
  // The message describes the seats as they were before this request (a row it already inserted is left out).
  if (adding === 0) usage.pending = Math.max(0, usage.pending - 1)
  const who = role === 'crew' ? 'crew member' : ROLE_LABELS[role].toLowerCase()
  const inUse = `All ${usage.paid} seat${usage.paid === 1 ? '' : 's'} of ${org.name} are taken (${usage.members} member${usage.members === 1 ? '' : 's'} with an editing role` +
    (opts.countPending === false ? ')' : ` and ${usage.pending} pending invitation${usage.pending === 1 ? '' : 's'} for one)`)
  let remedy: string
  if (!can(actorRole, 'billing.manage')) {
    remedy = `Ask one of its owners to add a seat${actorRole ? '' : ', then open this link again'}.`
  } else if (state.plan === 'trial' || !state.stripeSubscriptionId) {
    remedy = `The trial includes ${TRIAL_SEATS} seats: choose a plan on the Billing page to add more, or invite them as a viewer (free).`
  } else {
    remedy = `Add ${short} seat${short === 1 ? '' : 's'} (charged pro rata for the rest of the period), or invite them as a viewer (free).`
  }
  throw createError({
    statusCode: 402,
    statusMessage: 'No free seat',
    data: {
      message: `${inUse}. A ${who} needs a seat. ${remedy}`,
      seats: { paid: usage.paid, used: seatsUsed(usage), short },
    },
  })
}

/** The standing for every member (the banner): what state, until when, and whether this person can act. */
export async function standingView(ctx: MemberContext): Promise<BillingStandingView> {
  const state = await billingStateOf(useDb(), ctx.org.id)
  const s = standingFor(state)
  return {
    state: s.state, reason: s.reason, readOnly: s.readOnly, graceUntil: iso(s.graceUntil), trialEndsAt: iso(s.trialEndsAt),
    planName: PLANS[state.plan].name, canManage: can(ctx.member.role, 'billing.manage'),
  }
}

/** A live subscription (one whose seats can change), as opposed to none or an ended one. */
export function hasLiveSubscription(state: BillingState): boolean {
  return !!state.stripeSubscriptionId && !['canceled', 'incomplete_expired'].includes(state.status)
}

/** The owner's billing overview. */
export async function billingSummary(ctx: MemberContext): Promise<BillingSummary> {
  const db = useDb()
  const state = await billingStateOf(db, ctx.org.id)
  const usage = await seatUsageOf(db, ctx.org.id, state.seatsPaid)
  const sites = await db.selectFrom('sites').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('organisation_id', '=', ctx.org.id).where('archived_at', 'is', null).executeTakeFirstOrThrow()
  const s = standingFor(state)
  const plan = PLANS[state.plan]
  const perSeat = state.interval && plan.perSeat[state.interval] ? seatPrice(state.plan, state.interval) : null
  const live = hasLiveSubscription(state)
  return {
    plan: { key: plan.key, name: plan.name, summary: plan.summary, limits: plan.limits },
    interval: state.interval,
    status: state.status,
    standing: { state: s.state, reason: s.reason, readOnly: s.readOnly, graceUntil: iso(s.graceUntil), trialEndsAt: iso(s.trialEndsAt) },
    seats: { paid: usage.paid, used: seatsUsed(usage), members: usage.members, pending: usage.pending, free: seatsFree(usage) },
    perSeat,
    periodTotal: perSeat && state.interval ? subscriptionTotal(state.plan, state.interval, state.seatsPaid) : null,
    currentPeriodEnd: iso(state.currentPeriodEnd),
    cancelAtPeriodEnd: state.cancelAtPeriodEnd,
    endedAt: iso(state.endedAt),
    canSubscribe: !live,
    subscribed: live,
    hasCustomer: !!state.stripeCustomerId,
    usage: { sites: Number(sites.n), storageBytes: await storedBytes(db, ctx.org.id) },
  }
}

/** The organisation's invoices, newest first, a page at a time. */
export async function invoicePage(ctx: MemberContext, page: number, pageSize: number): Promise<BillingInvoicePage> {
  const db = useDb()
  const [rows, count] = await Promise.all([
    db.selectFrom('billing_invoices').selectAll()
      .where('organisation_id', '=', ctx.org.id)
      .orderBy('issued_at', 'desc').orderBy(sql`number desc nulls last`).orderBy('id', 'desc')
      .limit(pageSize).offset((page - 1) * pageSize)
      .execute(),
    db.selectFrom('billing_invoices').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', ctx.org.id).executeTakeFirstOrThrow(),
  ])
  return {
    items: rows.map((r) => ({
      id: r.id,
      number: r.number,
      status: r.status,
      reason: r.billing_reason,
      total: { amount: Number(r.total), currency: r.currency },
      amountPaid: { amount: Number(r.amount_paid), currency: r.currency },
      issuedAt: new Date(r.issued_at).toISOString(),
      periodStart: iso(r.period_start),
      periodEnd: iso(r.period_end),
      hostedUrl: r.hosted_url,
      pdfUrl: r.pdf_url,
    })),
    total: Number(count.n),
    page,
    pageSize,
  }
}

/** Bumps the billing row's version and time stamp in an update (optimistic-locking convention). */
export const touched = () => ({ version: sql<number>`version + 1`, updated_at: new Date() })
