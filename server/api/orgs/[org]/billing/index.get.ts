import { billingSummaryQuerySchema } from '#shared/schemas/billing'
import { billingSummary } from '~~/server/services/billing'
import { syncCheckout } from '~~/server/services/billing-stripe'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage' })
  const { checkoutSession } = queryOf(event, billingSummaryQuerySchema)
  // Back from Checkout: confirm the outcome with the provider before answering, so the page shows it at once.
  const checkout = checkoutSession ? await syncCheckout(ctx, checkoutSession) : undefined
  const summary = await billingSummary(ctx)
  return checkout ? { ...summary, checkout } : summary
})
