import { describe, expect, it } from 'vitest'
import { OUTBOX_MAX_ATTEMPTS, afterFailure, outboxRetryDelayMinutes } from '../../../shared/notices'

// Exponential back-off that doubles from one minute and is capped: common practice for retrying a mail relay.
describe('outbox back-off', () => {
  it('waits 1, 2, 4, 8, 16, 32 minutes after the first six failures, then never more than an hour', () => {
    expect([1, 2, 3, 4, 5, 6, 7, 8, 12].map(outboxRetryDelayMinutes)).toEqual([1, 2, 4, 8, 16, 32, 60, 60, 60])
  })

  it('treats a count below one as the first failure', () => {
    expect(outboxRetryDelayMinutes(0)).toBe(1)
    expect(outboxRetryDelayMinutes(-3)).toBe(1)
  })

  it('schedules the next try from the moment of failure, in the given unit', () => {
    const now = new Date('2026-12-03T10:00:00Z')
    expect(afterFailure(1, now)).toEqual({ state: 'waiting', nextAttemptAt: new Date('2026-12-03T10:01:00Z') })
    expect(afterFailure(3, now)).toEqual({ state: 'waiting', nextAttemptAt: new Date('2026-12-03T10:04:00Z') })
    expect(afterFailure(3, now, { unitMs: 1000 })).toEqual({ state: 'waiting', nextAttemptAt: new Date('2026-12-03T10:00:04Z') })
  })

  it('gives up as failed once the attempts reach the limit', () => {
    const now = new Date('2026-12-03T10:00:00Z')
    expect(afterFailure(OUTBOX_MAX_ATTEMPTS - 1, now).state).toBe('waiting')
    expect(afterFailure(OUTBOX_MAX_ATTEMPTS, now)).toEqual({ state: 'failed', nextAttemptAt: null })
    expect(afterFailure(2, now, { maxAttempts: 2 })).toEqual({ state: 'failed', nextAttemptAt: null })
  })

  it('spreads eight attempts over about two hours before giving up', () => {
    // 1 + 2 + 4 + 8 + 16 + 32 + 60 = 123 minutes of waiting between the 8 attempts.
    let total = 0
    for (let n = 1; n < OUTBOX_MAX_ATTEMPTS; n++) total += outboxRetryDelayMinutes(n)
    expect(total).toBe(123)
  })
})
