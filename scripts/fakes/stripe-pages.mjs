// HTML pages of the local Stripe fake: the hosted checkout, the billing portal and the hosted invoice.
// Plain server-rendered forms so browser tests can drive them with a click and no scripts.

const esc = (/** @type {unknown} */ s) =>
  String(s ?? '').replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c)

/** Formats integer minor units, e.g. 3900 usd → "39.00 USD". */
export const money = (/** @type {number} */ minor, /** @type {string} */ currency) =>
  `${(minor / 100).toFixed(2)} ${currency.toUpperCase()}`

const day = (/** @type {number} */ ts) => new Date(ts * 1000).toISOString().slice(0, 10)

function layout(/** @type {string} */ title, /** @type {string} */ body) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title>
<meta name="viewport" content="width=device-width,initial-scale=1">
<style>
body{font-family:system-ui,sans-serif;background:#f5f5f4;color:#1c1917;margin:0;padding:2rem 1rem}
main{max-width:34rem;margin:0 auto;background:#fff;border:1px solid #d6d3d1;border-radius:.5rem;padding:1.5rem}
h1{font-size:1.25rem;margin:0 0 .25rem}p.note{color:#57534e;font-size:.875rem}
table{width:100%;border-collapse:collapse;font-variant-numeric:tabular-nums;margin:1rem 0}
td,th{text-align:left;padding:.4rem 0;border-bottom:1px solid #e7e5e4}td.num,th.num{text-align:right}
button{font:inherit;background:#292524;color:#fff;border:0;border-radius:.375rem;padding:.6rem 1.2rem;cursor:pointer}
button.secondary{background:#e7e5e4;color:#1c1917}.error{color:#a52c60;font-weight:600}
label{display:block;margin:.75rem 0 .25rem}input{font:inherit;padding:.4rem;width:100%;box-sizing:border-box}
form{display:inline}.row{display:flex;gap:.5rem;flex-wrap:wrap;margin-top:1rem}
</style></head><body><main>${body}
<p class="note">Local payment fake for development and tests. No money moves.</p></main></body></html>`
}

/**
 * The hosted checkout page with a Pay button.
 * @param {{ session: any, lines: { description: string, quantity: number, amount: number }[], email: string | null, error?: string }} view
 */
export function checkoutPage({ session, lines, email, error }) {
  const rows = lines
    .map((l) => `<tr><td>${esc(l.description)}</td><td class="num">${l.quantity}</td><td class="num">${money(l.amount, session.currency)}</td></tr>`)
    .join('')
  const closed = session.status !== 'open'
  return layout(
    'Checkout',
    `<h1>Checkout</h1>
<table><thead><tr><th>Item</th><th class="num">Seats</th><th class="num">Per period</th></tr></thead><tbody>${rows}</tbody>
<tfoot><tr><th>Total</th><th></th><th class="num" data-testid="checkout-total">${money(session.amount_total, session.currency)}</th></tr></tfoot></table>
${error ? `<p class="error" role="alert">${esc(error)}</p>` : ''}
${closed ? `<p>This checkout session is ${esc(session.status)}.</p>` : `<form method="post" action="/checkout/${esc(session.id)}/pay">
${email ? `<p>Paying as ${esc(email)}</p>` : '<label for="email">E-mail</label><input id="email" name="email" type="email" required>'}
<div class="row"><button type="submit">Pay</button>
${session.cancel_url ? `<a href="${esc(session.cancel_url)}">Cancel</a>` : ''}</div></form>`}`,
  )
}

/**
 * The billing portal: subscriptions with cancel/resume and a card change that retries open invoices.
 * @param {{ portal: any, customer: any, subscriptions: any[], planName: (priceId: string) => string }} view
 */
export function portalPage({ portal, customer, subscriptions, planName }) {
  const action = (/** @type {string} */ name, /** @type {string} */ sub, /** @type {string} */ label, secondary = false) =>
    `<form method="post" action="/portal/${esc(portal.id)}/action"><input type="hidden" name="action" value="${name}">
<input type="hidden" name="subscription" value="${esc(sub)}"><button type="submit"${secondary ? ' class="secondary"' : ''}>${label}</button></form>`
  const subs = subscriptions
    .map((s) => {
      const item = s.items.data[0]
      return `<section data-subscription="${esc(s.id)}"><h2>${esc(planName(item.price.id))} × ${item.quantity}</h2>
<p>Status: <strong>${esc(s.status)}</strong>${s.cancel_at_period_end ? ' (ends at period end)' : ''} · current period ends ${day(item.current_period_end)}</p>
<div class="row">${s.cancel_at_period_end ? action('resume', s.id, 'Keep subscription') : action('cancel', s.id, 'Cancel at period end', true)}</div></section>`
    })
    .join('')
  const card = customer.invoice_settings?.default_payment_method ? 'Card ending 4242 on file' : 'No card on file'
  return layout(
    'Billing portal',
    `<h1>Billing portal</h1><p>${esc(customer.email ?? customer.id)}</p>${subs || '<p>No active subscription.</p>'}
<h2>Payment method</h2><p>${card}</p><div class="row">${action('card', '', 'Update card')}</div>
${portal.return_url ? `<p><a href="${esc(portal.return_url)}">Return</a></p>` : ''}`,
  )
}

/** The hosted invoice page. */
export function invoicePage(/** @type {any} */ invoice) {
  const rows = invoice.lines.data
    .map((/** @type {any} */ l) => `<tr><td>${esc(l.description)}</td><td class="num">${money(l.amount, invoice.currency)}</td></tr>`)
    .join('')
  return layout(
    `Invoice ${invoice.number}`,
    `<h1>Invoice ${esc(invoice.number)}</h1><p>Status: <strong>${esc(invoice.status)}</strong> · ${day(invoice.created)}</p>
<table><tbody>${rows}</tbody><tfoot><tr><th>Total</th><th class="num">${money(invoice.total, invoice.currency)}</th></tr>
<tr><th>Paid</th><th class="num">${money(invoice.amount_paid, invoice.currency)}</th></tr></tfoot></table>`,
  )
}
