import { describe, expect, it } from 'vitest'
import { DEFAULT_PLANS } from '../../../scripts/fakes/stripe-billing.mjs'
import {
  PLANS, SEAT_ROLES, formatMoney, lookupKey, parseLookupKey, prorationEstimate, seatPrice, seatsFree, seatsShort, seatsUsed,
  subscriptionTotal, takesSeat, yearlySavingPerSeat,
} from '../../../shared/billing/plans'
import { ROLES } from '../../../shared/permissions'

describe('plans as data', () => {
  it('match the catalogue the local payment fake sells, price for price', () => {
    // Cross-check against scripts/fakes/stripe-billing.mjs DEFAULT_PLANS (the checkout refuses a mismatch at run time too).
    for (const fakePlan of DEFAULT_PLANS) {
      const ours = PLANS[fakePlan.key as keyof typeof PLANS]
      expect(ours, fakePlan.key).toBeDefined()
      expect(ours.name).toBe(fakePlan.name)
      for (const [interval, amount] of Object.entries(fakePlan.prices)) {
        expect(ours.perSeat[interval as 'month' | 'year'], `${fakePlan.key} ${interval}`).toEqual({ amount, currency: 'usd' })
      }
      expect(Object.keys(ours.perSeat).sort()).toEqual(Object.keys(fakePlan.prices).sort())
    }
  })

  it('stores every price as an integer number of minor units', () => {
    for (const plan of Object.values(PLANS)) {
      for (const money of Object.values(plan.perSeat)) expect(Number.isInteger(money!.amount)).toBe(true)
    }
  })

  it('names prices by lookup key and reads the keys back', () => {
    expect(lookupKey('programme', 'month')).toBe('programme_monthly')
    expect(lookupKey('utility', 'year')).toBe('utility_yearly')
    expect(parseLookupKey('utility_yearly')).toEqual({ plan: 'utility', interval: 'year' })
    expect(parseLookupKey('enterprise_monthly')).toBeNull()
    expect(parseLookupKey('programme_weekly')).toBeNull()
    expect(parseLookupKey(null)).toBeNull()
  })
})

describe('price arithmetic', () => {
  it('multiplies the per-seat price by the seats', () => {
    // 7 seats × 39.00 = 273.00 per month: common practice (per-seat licensing, unit price × quantity)
    expect(subscriptionTotal('programme', 'month', 7)).toEqual({ amount: 27300, currency: 'usd' })
    // 12 seats × 690.00 = 8280.00 per year
    expect(subscriptionTotal('utility', 'year', 12)).toEqual({ amount: 828000, currency: 'usd' })
    expect(() => subscriptionTotal('programme', 'month', 2.5)).toThrow(/whole number/)
    expect(() => seatPrice('trial', 'year')).toThrow(/not sold yearly/)
  })

  it('makes yearly billing cheaper than twelve months', () => {
    // 12 × 39.00 − 390.00 = 78.00 per seat; 12 × 69.00 − 690.00 = 138.00 per seat (two months free)
    expect(yearlySavingPerSeat('programme')).toBe(7800)
    expect(yearlySavingPerSeat('utility')).toBe(13800)
    expect(yearlySavingPerSeat('trial')).toBe(0)
  })

  it('prorates added seats by the unused share of the period', () => {
    const period = { start: new Date('2026-12-01T00:00:00Z'), end: new Date('2026-12-31T00:00:00Z') }
    // Half of a 30-day period left, 2 seats at 39.00: 2 × 3900 × 15/30 = 3900. Common practice: time-proportional
    // proration, as the payment provider documents it ("prorations are calculated to the second").
    expect(prorationEstimate(3900, 2, period, new Date('2026-12-16T00:00:00Z'))).toBe(3900)
    // One day of thirty left, 1 seat at 69.00: 6900 / 30 = 230
    expect(prorationEstimate(6900, 1, period, new Date('2026-12-30T00:00:00Z'))).toBe(230)
    // Rounded to the minor unit: 10 of 31 days left, 1 seat at 39.00: 3900 × 10/31 = 1258.06… → 1258
    const december = { start: new Date('2026-12-01T00:00:00Z'), end: new Date('2027-01-01T00:00:00Z') }
    expect(prorationEstimate(3900, 1, december, new Date('2026-12-22T00:00:00Z'))).toBe(1258)
    // Clamped: before the period the whole price, after it nothing.
    expect(prorationEstimate(3900, 1, period, new Date('2026-11-01T00:00:00Z'))).toBe(3900)
    expect(prorationEstimate(3900, 1, period, new Date('2027-01-05T00:00:00Z'))).toBe(0)
  })

  it('formats minor units with the currency code', () => {
    expect(formatMoney(3900, 'usd')).toBe('39.00 USD')
    expect(formatMoney(828000, 'usd')).toBe('8,280.00 USD')
    expect(formatMoney(0, 'usd')).toBe('0.00 USD')
    expect(formatMoney(-1250, 'eur')).toBe('-12.50 EUR')
    // ISO 4217: the yen has no minor unit.
    expect(formatMoney(500, 'jpy')).toBe('500 JPY')
  })
})

describe('seat rule', () => {
  it('gives a seat to every editing role and none to viewers', () => {
    expect(ROLES.filter(takesSeat)).toEqual(['owner', 'manager', 'thermographer', 'crew'])
    expect([...SEAT_ROLES]).toEqual(['owner', 'manager', 'thermographer', 'crew'])
    expect(takesSeat('viewer')).toBe(false)
  })

  it('counts members and pending invitations against the paid seats', () => {
    const usage = { paid: 5, members: 3, pending: 1 }
    expect(seatsUsed(usage)).toBe(4)
    expect(seatsFree(usage)).toBe(1)
    expect(seatsShort(usage, 1)).toBe(0)
    expect(seatsShort(usage, 2)).toBe(1)
    expect(seatsShort(usage, 4)).toBe(3)
    // Seats reduced below use elsewhere: nothing free, and one more person needs the difference plus one.
    const over = { paid: 2, members: 3, pending: 0 }
    expect(seatsFree(over)).toBe(0)
    expect(seatsShort(over, 1)).toBe(2)
    expect(seatsShort(over, 0)).toBe(1)
  })
})
