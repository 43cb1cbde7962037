import { describe, expect, it } from 'vitest'
import { expand, listEnvelope, mergeMetadata, parseStripeForm } from '../../../scripts/fakes/stripe-params.mjs'

describe('Stripe form decoding', () => {
  it('decodes the SDK’s indexed bracket encoding into nested objects and arrays', () => {
    // Shape as stripe-node 23 encodes it (stringifyRequestData: arr[0], obj[key], brackets left unencoded).
    const body = 'customer=cus_1&items[0][price]=price_programme_monthly&items[0][quantity]=3&items[1][id]=si_2&items[1][deleted]=true'
      + '&metadata[organisation_id]=org%201&expand[0]=latest_invoice&expand[1]=items.data.price.product&proration_behavior=always_invoice'
    expect(parseStripeForm(body)).toEqual({
      customer: 'cus_1',
      items: [{ price: 'price_programme_monthly', quantity: '3' }, { id: 'si_2', deleted: 'true' }],
      metadata: { organisation_id: 'org 1' },
      expand: ['latest_invoice', 'items.data.price.product'],
      proration_behavior: 'always_invoice',
    })
  })

  it('accepts percent-encoded and empty brackets and ignores prototype keys', () => {
    expect(parseStripeForm('expand%5B%5D=customer&expand[]=subscription&__proto__[x]=1&a[constructor]=2')).toEqual({ expand: ['customer', 'subscription'] })
  })

  it('removes metadata keys set to an empty string', () => {
    expect(mergeMetadata({ a: '1', b: '2' }, { a: '', c: '3' })).toEqual({ b: '2', c: '3' })
  })

  it('paginates newest first with starting_after', () => {
    const rows = ['c', 'b', 'a'].map((id) => ({ id }))
    const page1 = listEnvelope(rows, { limit: '2' }, '/v1/x')
    expect(page1.data.map((r: { id: string }) => r.id)).toEqual(['c', 'b'])
    expect(page1.has_more).toBe(true)
    const page2 = listEnvelope(rows, { limit: '2', starting_after: 'b' }, '/v1/x')
    expect(page2.data.map((r: { id: string }) => r.id)).toEqual(['a'])
    expect(page2.has_more).toBe(false)
  })

  it('expands nested ids through lists without touching the stored object', () => {
    const stored = { object: 'list', data: [{ id: 'sub_1', customer: 'cus_1' }] }
    const lookup = (id: string) => (id === 'cus_1' ? { id: 'cus_1', email: 'o@example.test' } : undefined)
    const out = expand(stored, ['data.customer'], lookup)
    expect(out.data[0]!.customer).toEqual({ id: 'cus_1', email: 'o@example.test' })
    expect(stored.data[0]!.customer).toBe('cus_1')
  })
})
