import type Stripe from 'stripe'
import { handleStripeEvent } from '~~/server/services/billing-webhooks'

// Public: the payment provider calls it. Trust comes only from the signature, checked on the exact bytes
// received (a re-serialised body would not verify), with the provider's tolerance against replays of old requests.
export default defineEventHandler(async (event) => {
  const signature = getHeader(event, 'stripe-signature')
  const raw = await readRawBody(event, false)
  const refuse = (message: string) => createError({ statusCode: 400, statusMessage: 'Bad webhook', data: { message } })
  if (!signature) throw refuse('Missing Stripe-Signature header.')
  if (!raw || raw.length === 0) throw refuse('Empty body.')
  let stripeEvent: Stripe.Event
  try {
    stripeEvent = useStripe().webhooks.constructEvent(raw, signature, stripeWebhookSecret())
  } catch {
    throw refuse('The signature does not match this body and secret.')
  }
  const outcome = await handleStripeEvent(stripeEvent)
  return { received: true, outcome }
})
