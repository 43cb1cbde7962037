import { describe, expect, it } from 'vitest'
import { GRACE_DAYS, TRIAL_DAYS } from '../../../shared/billing/plans'
import { addDays, daysUntil, standingOf } from '../../../shared/billing/standing'

const start = new Date('2026-12-01T09:00:00Z')
const trialEndsAt = addDays(start, TRIAL_DAYS)
const trial = { status: 'trialing' as const, subscribed: false, trialEndsAt, graceUntil: null }

describe('standing', () => {
  it('runs the trial, then the grace period, then turns read-only', () => {
    expect(TRIAL_DAYS).toBe(30)
    expect(GRACE_DAYS).toBe(14)
    expect(trialEndsAt.toISOString()).toBe('2026-12-31T09:00:00.000Z')
    expect(standingOf(trial, addDays(start, 29))).toMatchObject({ state: 'trial', readOnly: false })
    const justEnded = standingOf(trial, trialEndsAt)
    expect(justEnded).toMatchObject({ state: 'grace', reason: 'trial_ended', readOnly: false })
    // 31 Dec 09:00 + 14 days = 14 Jan 09:00
    expect(justEnded.graceUntil?.toISOString()).toBe('2027-01-14T09:00:00.000Z')
    expect(standingOf(trial, new Date('2027-01-14T08:59:59Z')).readOnly).toBe(false)
    expect(standingOf(trial, new Date('2027-01-14T09:00:00Z'))).toMatchObject({ state: 'read_only', reason: 'trial_ended', readOnly: true })
  })

  it('gives grace after a failed payment until the recorded date, and none once paid', () => {
    const graceUntil = new Date('2027-02-10T00:00:00Z')
    const failed = { status: 'past_due' as const, subscribed: true, trialEndsAt, graceUntil }
    expect(standingOf(failed, new Date('2027-02-01T00:00:00Z'))).toMatchObject({ state: 'grace', reason: 'payment_failed', readOnly: false })
    expect(standingOf(failed, graceUntil)).toMatchObject({ state: 'read_only', reason: 'payment_failed', readOnly: true })
    // Paid again: active whatever the old dates say (the trial end is long past).
    expect(standingOf({ ...failed, status: 'active', graceUntil: null }, new Date('2027-06-01T00:00:00Z'))).toMatchObject({ state: 'active', readOnly: false })
  })

  it('starts grace now when a failure has no recorded start, rather than locking at once', () => {
    const now = new Date('2027-03-01T00:00:00Z')
    const s = standingOf({ status: 'unpaid', subscribed: true, trialEndsAt, graceUntil: null }, now)
    expect(s.readOnly).toBe(false)
    expect(s.graceUntil?.toISOString()).toBe('2027-03-15T00:00:00.000Z')
  })

  it('is read-only once a subscription has ended, and active during a cancellation notice', () => {
    const now = new Date('2027-03-01T00:00:00Z')
    expect(standingOf({ status: 'canceled', subscribed: true, trialEndsAt, graceUntil: null }, now)).toMatchObject({ state: 'read_only', reason: 'ended' })
    expect(standingOf({ status: 'incomplete_expired', subscribed: true, trialEndsAt, graceUntil: null }, now).readOnly).toBe(true)
    expect(standingOf({ status: 'active', subscribed: true, trialEndsAt, graceUntil: null }, now).readOnly).toBe(false)
    // A provider-side trial is paid up, unlike our own trial after its end.
    expect(standingOf({ status: 'trialing', subscribed: true, trialEndsAt, graceUntil: null }, now).state).toBe('active')
  })

  it('counts whole days left, rounding up', () => {
    expect(daysUntil(new Date('2027-01-14T09:00:00Z'), new Date('2027-01-13T09:00:01Z'))).toBe(1)
    expect(daysUntil(new Date('2027-01-14T09:00:00Z'), new Date('2027-01-04T09:00:00Z'))).toBe(10)
    expect(daysUntil(new Date('2027-01-14T09:00:00Z'), new Date('2027-01-20T00:00:00Z'))).toBe(0)
  })
})
