import Stripe from 'stripe'

let client: Stripe | undefined

// Production leaves host/port/protocol empty and talks to the real API; locally and in tests they point the
// unchanged SDK at the loopback fake (scripts/fakes/stripe-fake.mjs).
function options(): Stripe.StripeConfig {
  const config = useRuntimeConfig()
  const opts: Stripe.StripeConfig = { maxNetworkRetries: 2, timeout: 20_000, appInfo: { name: 'Greybody' } }
  if (config.stripeApiHost) opts.host = String(config.stripeApiHost)
  if (config.stripeApiPort) opts.port = Number(config.stripeApiPort)
  if (config.stripeApiProtocol) opts.protocol = String(config.stripeApiProtocol) as 'http' | 'https'
  return opts
}

function notConfigured(what: string) {
  return createError({
    statusCode: 503,
    statusMessage: 'Payments not configured',
    data: { message: `Payments are not set up on this server (${what} is missing). Ask the operator to configure Stripe.` },
  })
}

/** The Stripe client of this server process, configured from runtime config; 503 when no key is set. */
export function useStripe(): Stripe {
  if (client) return client
  const key = useRuntimeConfig().stripeSecretKey
  if (!key) throw notConfigured('the secret key')
  client = new Stripe(String(key), options())
  return client
}

/** The webhook signing secret; 503 when missing (an unverifiable webhook is never accepted). */
export function stripeWebhookSecret(): string {
  const secret = useRuntimeConfig().stripeWebhookSecret
  if (!secret) throw notConfigured('the webhook signing secret')
  return String(secret)
}

/**
 * Turns a failed Stripe call into our API error shape: a declined card is 402 with the provider's words,
 * anything else is 502 without internals (the details go to the server log).
 */
export function stripeFailure(err: unknown, doing: string): Error {
  if (err instanceof Stripe.errors.StripeCardError) {
    return createError({
      statusCode: 402,
      statusMessage: 'Card declined',
      data: { message: `${err.message} Nothing was changed. Update the card in the billing portal and try again.` },
    })
  }
  if (err instanceof Stripe.errors.StripeError) {
    console.error(`[stripe] ${doing}: ${err.type} ${err.code ?? ''} ${err.message}`)
    return createError({
      statusCode: 502,
      statusMessage: 'Payment service error',
      data: { message: `The payment service could not ${doing}. Nothing was changed; try again in a moment.` },
    })
  }
  return err instanceof Error ? err : new Error(String(err))
}
