import Stripe from 'stripe'
import { expect } from 'vitest'
import { testEnv } from './env'

/** The test profile's Stripe fake: its base URL, an SDK client pointed at it, and the webhook secret. */
export function stripeFake() {
  const env = testEnv()
  const port = Number(env.NUXT_STRIPE_API_PORT)
  const url = `http://127.0.0.1:${port}`
  return {
    url,
    secret: env.NUXT_STRIPE_WEBHOOK_SECRET!,
    sdk: new Stripe(env.NUXT_STRIPE_SECRET_KEY!, { host: '127.0.0.1', port, protocol: 'http', maxNetworkRetries: 0 }),
    /** POSTs to a control endpoint (reset, fail-next-payment, advance, …). */
    async control(path: string): Promise<any> {
      const res = await fetch(`${url}/_control/${path}`, { method: 'POST' })
      expect(res.status, `control ${path}`).toBe(200)
      return res.json()
    },
    /** An API object as JSON, read directly (the SDK's decimal fields hold BigInts, which JSON cannot carry). */
    async get(apiPath: string): Promise<any> {
      const res = await fetch(`${url}/v1/${apiPath}`, { headers: { authorization: `Bearer ${env.NUXT_STRIPE_SECRET_KEY}` } })
      expect(res.status, apiPath).toBe(200)
      return res.json()
    },
    /** Webhook deliveries so far, after the queue has drained. */
    async deliveries(): Promise<Array<{ event: string; type: string; url: string | null; status: number | null; error: string | null }>> {
      return (await fetch(`${url}/_control/webhooks`)).json()
    },
  }
}

/** Presses Pay on the fake's Checkout page, as a person would; returns where the page sends the browser. */
export async function payCheckout(checkoutUrl: string): Promise<string> {
  const page = await fetch(checkoutUrl)
  expect(page.status).toBe(200)
  expect(await page.text()).toContain('>Pay</button>')
  const paid = await fetch(`${checkoutUrl}/pay`, { method: 'POST', redirect: 'manual' })
  expect(paid.status, 'checkout pay').toBe(303)
  return paid.headers.get('location') ?? ''
}

/** Posts a webhook to the app with a signature made with `secret` (the right one, or a wrong one to test refusal). */
export async function postWebhook(baseUrl: string, payload: string, secret: string, opts: { signature?: string } = {}) {
  const signature = opts.signature ?? Stripe.webhooks.generateTestHeaderString({ payload, secret })
  const res = await fetch(`${baseUrl}/api/stripe/webhook`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'stripe-signature': signature },
    body: payload,
  })
  const text = await res.text()
  let body: any = text
  try { body = JSON.parse(text) } catch { /* not JSON */ }
  return { status: res.status, body }
}
