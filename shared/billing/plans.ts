// Greybody's plans as data, shared by the server (checkout, seat checks), the billing page and the tests.
// Prices are per seat per billing interval in integer minor units. The payment provider's catalogue is
// found by lookup key (`<plan>_<interval>ly`), and the server refuses to sell a price that disagrees with
// these figures, so what a person is shown is what they are charged.
import type { Role } from '../permissions'

export const PLAN_KEYS = ['trial', 'programme', 'utility'] as const
export type PlanKey = (typeof PLAN_KEYS)[number]
/** Plans a person can buy; the trial is given, never sold. */
export const PAID_PLAN_KEYS = ['programme', 'utility'] as const
export type PaidPlanKey = (typeof PAID_PLAN_KEYS)[number]

export const BILLING_INTERVALS = ['month', 'year'] as const
export type BillingInterval = (typeof BILLING_INTERVALS)[number]

export const CURRENCY = 'usd'
/** Length of the trial every new organisation starts on. */
export const TRIAL_DAYS = 30
/** Seats during the trial: enough to try a survey with a small field team. */
export const TRIAL_SEATS = 10
/** Days an organisation keeps editing after its trial ends or a payment fails, before it becomes read-only. */
export const GRACE_DAYS = 14
/** Upper bound of one purchase, against typing mistakes (a larger utility talks to us). */
export const MAX_SEATS = 500

export interface Money {
  /** Integer minor units (cents for USD). */
  amount: number
  currency: string
}

export interface PlanLimits {
  /** Sites in the register; null = no limit. */
  sites: number | null
  /** Image and document storage in GB; null = no limit. */
  storageGb: number | null
}

export interface Plan {
  key: PlanKey
  name: string
  summary: string
  /** Price per seat for each interval the plan is sold in. */
  perSeat: Partial<Record<BillingInterval, Money>>
  limits: PlanLimits
}

export const PLANS: Record<PlanKey, Plan> = {
  trial: {
    key: 'trial',
    name: 'Trial',
    summary: `Every feature for ${TRIAL_DAYS} days with up to ${TRIAL_SEATS} editing seats.`,
    perSeat: { month: { amount: 0, currency: CURRENCY } },
    limits: { sites: 25, storageGb: 10 },
  },
  programme: {
    key: 'programme',
    name: 'Programme',
    summary: 'One inspection programme: its sites, routes, surveys and repairs.',
    perSeat: { month: { amount: 3900, currency: CURRENCY }, year: { amount: 39000, currency: CURRENCY } },
    limits: { sites: 250, storageGb: 500 },
  },
  utility: {
    key: 'utility',
    name: 'Utility',
    summary: 'Utilities running several programmes across regions and contractors.',
    perSeat: { month: { amount: 6900, currency: CURRENCY }, year: { amount: 69000, currency: CURRENCY } },
    limits: { sites: null, storageGb: 5000 },
  },
}

/** Whether a string names a plan. */
export function isPlanKey(value: unknown): value is PlanKey {
  return typeof value === 'string' && (PLAN_KEYS as readonly string[]).includes(value)
}

/** The payment provider's lookup key of a plan's price, e.g. `programme_monthly`. */
export function lookupKey(plan: PlanKey, interval: BillingInterval): string {
  return `${plan}_${interval}ly`
}

/** Reads a lookup key back into plan and interval; null for keys that are not ours. */
export function parseLookupKey(key: string | null | undefined): { plan: PlanKey; interval: BillingInterval } | null {
  const m = /^([a-z]+)_(month|year)ly$/.exec(key ?? '')
  if (!m || !isPlanKey(m[1])) return null
  return { plan: m[1], interval: m[2] as BillingInterval }
}

/** The per-seat price of a plan for an interval; throws when the plan is not sold that way. */
export function seatPrice(plan: PlanKey, interval: BillingInterval): Money {
  const price = PLANS[plan].perSeat[interval]
  if (!price) throw new Error(`${PLANS[plan].name} is not sold ${interval}ly.`)
  return price
}

/** What a number of seats costs per interval, in minor units. */
export function subscriptionTotal(plan: PlanKey, interval: BillingInterval, seats: number): Money {
  if (!Number.isInteger(seats) || seats < 0) throw new Error(`Seats must be a whole number ≥ 0, got ${seats}.`)
  const price = seatPrice(plan, interval)
  return { amount: price.amount * seats, currency: price.currency }
}

/** Per-seat yearly saving against paying monthly for twelve months, in minor units (0 when not sold yearly). */
export function yearlySavingPerSeat(plan: PlanKey): number {
  const { month, year } = PLANS[plan].perSeat
  return month && year ? month.amount * 12 - year.amount : 0
}

/**
 * Estimated charge for adding seats part-way through a period: the unused fraction of the period times the
 * seat price, rounded to the minor unit (time-proportional proration, as the payment provider invoices it).
 */
export function prorationEstimate(
  perSeatAmount: number,
  addedSeats: number,
  period: { start: Date; end: Date },
  now: Date,
): number {
  const length = period.end.getTime() - period.start.getTime()
  if (length <= 0) return 0
  const unused = Math.min(1, Math.max(0, (period.end.getTime() - now.getTime()) / length))
  return Math.round(perSeatAmount * addedSeats * unused)
}

// Decimal places of the minor unit for the currencies we might sell in (ISO 4217).
const MINOR_DIGITS: Record<string, number> = { usd: 2, eur: 2, gbp: 2, cad: 2, aud: 2, nzd: 2, chf: 2, sek: 2, nok: 2, dkk: 2, jpy: 0 }

/** Formats minor units with the currency code always shown, e.g. 3900 usd → "39.00 USD". */
export function formatMoney(amount: number, currency: string): string {
  const digits = MINOR_DIGITS[currency.toLowerCase()] ?? 2
  const major = amount / 10 ** digits
  const text = new Intl.NumberFormat('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(major)
  return `${text} ${currency.toUpperCase()}`
}

// ---- Seats ------------------------------------------------------------------------------------------

/** Roles that occupy a paid seat: everyone who changes records. Viewers read for free. */
export const SEAT_ROLES = ['owner', 'manager', 'thermographer', 'crew'] as const satisfies readonly Role[]

/** Whether a member with this role occupies a seat. */
export function takesSeat(role: Role): boolean {
  return (SEAT_ROLES as readonly Role[]).includes(role)
}

export interface SeatUsage {
  /** Seats the organisation has: the trial's allowance or the subscription's quantity. */
  paid: number
  /** Active members with an editing role. */
  members: number
  /** Pending invitations for an editing role: held until accepted or withdrawn. */
  pending: number
}

/** Seats in use: members with an editing role plus pending invitations for one. */
export function seatsUsed(u: SeatUsage): number {
  return u.members + u.pending
}

/** Seats still free (never negative: seats may have been reduced below use elsewhere). */
export function seatsFree(u: SeatUsage): number {
  return Math.max(0, u.paid - seatsUsed(u))
}

/** How many seats must be added so that `adding` more people fit; 0 when they fit already. */
export function seatsShort(u: SeatUsage, adding = 1): number {
  return Math.max(0, seatsUsed(u) + adding - u.paid)
}
