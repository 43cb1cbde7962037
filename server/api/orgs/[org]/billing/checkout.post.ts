import { checkoutSchema } from '#shared/schemas/billing'
import { startCheckout } from '~~/server/services/billing-stripe'

// Allowed while read-only: paying is how a lapsed organisation gets its editing back.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage', allowWhenReadOnly: true })
  const input = await bodyOf(event, checkoutSchema)
  setResponseStatus(event, 201)
  return startCheckout(ctx, input)
})
