// Whether an organisation is paid up, in grace or read-only: one pure function so that the server's
// write guard, the banner and the tests agree on every boundary.
import { GRACE_DAYS } from './plans'

/** Subscription status as stored: the payment provider's status, or `trialing` for our own trial. */
export const SUBSCRIPTION_STATUSES = ['trialing', 'active', 'past_due', 'unpaid', 'incomplete', 'incomplete_expired', 'canceled', 'paused'] as const
export type SubscriptionStatus = (typeof SUBSCRIPTION_STATUSES)[number]

/** What the banner and the write guard act on. */
export type StandingState = 'trial' | 'active' | 'grace' | 'read_only'
/** Why an organisation is in grace or read-only. */
export type LapseReason = 'trial_ended' | 'payment_failed' | 'ended'

export interface BillingFacts {
  status: SubscriptionStatus
  /** Whether a paid subscription exists (an ended one counts: the organisation had paid). */
  subscribed: boolean
  trialEndsAt: Date | null
  /** Set when a payment first failed; cleared when paid. */
  graceUntil: Date | null
}

export interface Standing {
  state: StandingState
  reason: LapseReason | null
  readOnly: boolean
  /** End of the grace period while in grace or read-only after one; null otherwise. */
  graceUntil: Date | null
  trialEndsAt: Date | null
}

const DAY_MS = 86_400_000

/** Adds whole days to a date. */
export function addDays(d: Date, days: number): Date {
  return new Date(d.getTime() + days * DAY_MS)
}

/**
 * The organisation's standing at `now`. A trial runs to `trialEndsAt`, then GRACE_DAYS of grace; a failed
 * payment gives grace until `graceUntil`; after either, and once a subscription has ended, the organisation
 * is read-only (its data is kept and can be read and exported) until it pays again.
 */
export function standingOf(f: BillingFacts, now: Date): Standing {
  const base = { trialEndsAt: f.trialEndsAt }
  if (f.status === 'active') return { ...base, state: 'active', reason: null, readOnly: false, graceUntil: null }
  if (f.status === 'trialing' && !f.subscribed) {
    const end = f.trialEndsAt
    if (!end || now < end) return { ...base, state: 'trial', reason: null, readOnly: false, graceUntil: null }
    const graceUntil = addDays(end, GRACE_DAYS)
    return { ...base, state: now < graceUntil ? 'grace' : 'read_only', reason: 'trial_ended', readOnly: now >= graceUntil, graceUntil }
  }
  // A provider-side trial (not used by Greybody's checkout, but possible through the portal) is paid up.
  if (f.status === 'trialing') return { ...base, state: 'active', reason: null, readOnly: false, graceUntil: null }
  if (f.status === 'past_due' || f.status === 'unpaid' || f.status === 'incomplete') {
    // No recorded start (should not happen): grace starts now rather than locking people out unannounced.
    const graceUntil = f.graceUntil ?? addDays(now, GRACE_DAYS)
    const readOnly = now >= graceUntil
    return { ...base, state: readOnly ? 'read_only' : 'grace', reason: 'payment_failed', readOnly, graceUntil }
  }
  // canceled, incomplete_expired, paused: the paid period is over.
  return { ...base, state: 'read_only', reason: 'ended', readOnly: true, graceUntil: f.graceUntil }
}

/** Whole days from `now` until `until`, rounded up (0 once passed). */
export function daysUntil(until: Date, now: Date): number {
  return Math.max(0, Math.ceil((until.getTime() - now.getTime()) / DAY_MS))
}
