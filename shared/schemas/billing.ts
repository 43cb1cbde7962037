import { z } from 'zod'
import { BILLING_INTERVALS, MAX_SEATS, PAID_PLAN_KEYS } from '../billing/plans'

export const seatsSchema = z
  .number({ error: 'Enter a number of seats.' })
  .int('Seats are whole numbers.')
  .min(1, 'At least one seat: the owner holds one.')
  .max(MAX_SEATS, `Up to ${MAX_SEATS} seats online; contact us for more.`)

export const checkoutSchema = z.object({
  plan: z.enum(PAID_PLAN_KEYS, { error: 'Choose a plan.' }),
  interval: z.enum(BILLING_INTERVALS, { error: 'Choose monthly or yearly billing.' }),
  seats: seatsSchema,
})

export const seatChangeSchema = z.object({ seats: seatsSchema })

// Stripe ids are opaque but short and URL-safe; anything else is not ours to look up.
export const billingSummaryQuerySchema = z.object({
  checkoutSession: z.string().regex(/^cs_[A-Za-z0-9_]{1,200}$/, 'Not a checkout session.').optional(),
})

export const invoicesQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(1000).default(1),
  pageSize: z.coerce.number().int().min(1).max(50).default(10),
})
