// Shapes of the JSON the billing routes answer, as the client receives them (dates are ISO strings).
import type { BillingInterval, Money, PlanKey, PlanLimits } from '../billing/plans'
import type { LapseReason, StandingState, SubscriptionStatus } from '../billing/standing'

/** GET /api/orgs/:org/billing/standing — for every member (the banner). */
export interface BillingStandingView {
  state: StandingState
  reason: LapseReason | null
  readOnly: boolean
  graceUntil: string | null
  trialEndsAt: string | null
  planName: string
  /** Whether this person can act on it (owners). */
  canManage: boolean
}

/** GET /api/orgs/:org/billing — owners only. */
export interface BillingSummary {
  plan: { key: PlanKey; name: string; summary: string; limits: PlanLimits }
  interval: BillingInterval | null
  status: SubscriptionStatus
  standing: Omit<BillingStandingView, 'planName' | 'canManage'>
  seats: { paid: number; used: number; members: number; pending: number; free: number }
  perSeat: Money | null
  periodTotal: Money | null
  currentPeriodEnd: string | null
  cancelAtPeriodEnd: boolean
  endedAt: string | null
  /** No live subscription: the owner can go to Checkout. */
  canSubscribe: boolean
  /** A live subscription: seats can change and it can be cancelled. */
  subscribed: boolean
  /** The billing portal needs a customer at the payment provider. */
  hasCustomer: boolean
  /** Active sites, and bytes of stored files (images). */
  usage: { sites: number; storageBytes: number }
  /** Present when the page came back from Checkout with a session id. */
  checkout?: { status: 'open' | 'complete' | 'expired' | 'unknown' }
}

/** One row of GET /api/orgs/:org/billing/invoices. */
export interface BillingInvoiceView {
  id: string
  number: string | null
  status: string
  reason: string | null
  total: Money
  amountPaid: Money
  issuedAt: string
  periodStart: string | null
  periodEnd: string | null
  hostedUrl: string | null
  pdfUrl: string | null
}

export interface BillingInvoicePage {
  items: BillingInvoiceView[]
  total: number
  page: number
  pageSize: number
}
