import { describe, expect, it } from 'vitest'
import {
  DEFAULT_SCHEDULE_RULE, addDays, addMonths, daysBetween, dueStatus, intervalMonths, nextDue, todayIn, type ScheduleRule,
} from '#shared/schedule'

describe('intervalMonths: defaults', () => {
  it('is 12 months for condition 1 and 2, 6 months for condition 3', () => {
    expect(intervalMonths({ condition: 1 })).toEqual({ months: 12, reason: 'condition' }) // NFPA 70B 2023 Table 9.2.2: condition 1 → 12 months
    expect(intervalMonths({ condition: 2 })).toEqual({ months: 12, reason: 'condition' }) // NFPA 70B 2023 Table 9.2.2: condition 2 → 12 months
    expect(intervalMonths({ condition: 3 })).toEqual({ months: 6, reason: 'condition' }) // NFPA 70B 2023 Table 9.2.2: condition 3 → 6 months
  })

  it('halves the interval while a finding in band 2 ("monitor") is open', () => {
    // Common practice (reference sheet §6 [CP]): a monitor-band finding shortens the interval until repaired.
    expect(intervalMonths({ condition: 1, openFindingBand: 2 })).toEqual({ months: 6, reason: 'open finding' }) // 12 ÷ 2, common practice
    expect(intervalMonths({ condition: 3, openFindingBand: 2 })).toEqual({ months: 3, reason: 'open finding' }) // 6 ÷ 2, common practice
  })

  it('leaves the interval alone for findings outside the monitoring bands, or none', () => {
    for (const band of [1, 3, 4] as const) expect(intervalMonths({ condition: 2, openFindingBand: band }).months).toBe(12) // NFPA 70B 2023 Table 9.2.2
    expect(intervalMonths({ condition: 2, openFindingBand: null }).months).toBe(12) // NFPA 70B 2023 Table 9.2.2
  })
})

describe('intervalMonths: overrides', () => {
  it('takes the asset’s own interval over the condition default', () => {
    expect(intervalMonths({ condition: 1, assetIntervalMonths: 24 })).toEqual({ months: 24, reason: 'asset override' })
    expect(intervalMonths({ condition: 3, assetIntervalMonths: 3 })).toEqual({ months: 3, reason: 'asset override' })
    // The open-finding rule still applies on top of an override (common practice: the finding is what matters).
    expect(intervalMonths({ condition: 1, assetIntervalMonths: 24, openFindingBand: 2 })).toEqual({ months: 12, reason: 'open finding' })
  })

  it('follows the organisation’s rule', () => {
    const rule: ScheduleRule = { normalMonths: 24, condition3Months: 4, monitorBands: [1, 2], monitorFactor: 0.25 }
    expect(intervalMonths({ condition: 2 }, rule).months).toBe(24)
    expect(intervalMonths({ condition: 3 }, rule).months).toBe(4)
    expect(intervalMonths({ condition: 2, openFindingBand: 1 }, rule).months).toBe(6) // 24 × 0.25
    expect(intervalMonths({ condition: 2, openFindingBand: 2 }, rule).months).toBe(6)
    expect(intervalMonths({ condition: 2, openFindingBand: 3 }, rule).months).toBe(24)
  })

  it('rounds a shortened interval down, never below one month', () => {
    expect(intervalMonths({ condition: 1, assetIntervalMonths: 5, openFindingBand: 2 }).months).toBe(2) // 2.5 → 2: look sooner
    expect(intervalMonths({ condition: 1, assetIntervalMonths: 1, openFindingBand: 2 }).months).toBe(1)
    // 50 × 0.58 is 28.999999999999996 in binary floating point: still 29 months, as PostgreSQL's exact numeric gives.
    expect(intervalMonths({ condition: 1, assetIntervalMonths: 50, openFindingBand: 2 }, { ...DEFAULT_SCHEDULE_RULE, monitorFactor: 0.58 }).months).toBe(29)
  })

  it('refuses impossible inputs', () => {
    expect(() => intervalMonths({ condition: 4 as never })).toThrow(RangeError)
    expect(() => intervalMonths({ condition: 1, assetIntervalMonths: 0 })).toThrow(RangeError)
    expect(() => intervalMonths({ condition: 1 }, { ...DEFAULT_SCHEDULE_RULE, monitorFactor: 0 })).toThrow(RangeError)
    expect(() => intervalMonths({ condition: 1 }, { ...DEFAULT_SCHEDULE_RULE, normalMonths: 1.5 })).toThrow(RangeError)
  })
})

describe('calendar arithmetic', () => {
  it('adds months, keeping the day or clamping it to the end of a shorter month', () => {
    expect(addMonths('2026-03-15', 12)).toBe('2027-03-15')
    expect(addMonths('2026-08-31', 6)).toBe('2027-02-28')
    expect(addMonths('2027-08-31', 6)).toBe('2028-02-29') // 2028 is a leap year (Gregorian rule)
    expect(addMonths('2026-01-31', 1)).toBe('2026-02-28')
    expect(addMonths('2026-12-15', 1)).toBe('2027-01-15')
    expect(addMonths('2026-01-15', -1)).toBe('2025-12-15')
  })

  it('adds days and counts days between dates', () => {
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01')
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29')
    expect(daysBetween('2026-01-01', '2027-01-01')).toBe(365)
    expect(daysBetween('2028-01-01', '2029-01-01')).toBe(366)
    expect(daysBetween('2026-05-10', '2026-05-01')).toBe(-9)
  })

  it('refuses what is not a calendar date', () => {
    expect(() => addMonths('2026-02-30', 1)).toThrow(RangeError)
    expect(() => addMonths('15/03/2026', 1)).toThrow(RangeError)
  })

  it('reads today in the organisation’s time zone', () => {
    const instant = new Date('2026-12-31T23:30:00Z')
    expect(todayIn('Europe/London', instant)).toBe('2026-12-31') // GMT in winter (UTC+0)
    expect(todayIn('Pacific/Auckland', instant)).toBe('2027-01-01') // NZDT in December (UTC+13)
    expect(todayIn('America/Chicago', new Date('2027-01-01T03:00:00Z'))).toBe('2026-12-31') // CST (UTC−6)
  })
})

describe('nextDue', () => {
  it('is today for an asset never checked: a baseline survey is due now', () => {
    expect(nextDue({ condition: 1, lastCheckedOn: null }, '2026-12-02')).toEqual({ months: 12, reason: 'condition', dueOn: '2026-12-02', baseline: true })
  })

  it('is the last check plus the interval', () => {
    expect(nextDue({ condition: 2, lastCheckedOn: '2026-03-15' }, '2026-12-02').dueOn).toBe('2027-03-15') // NFPA 70B 2023 Table 9.2.2: 12 months
    expect(nextDue({ condition: 3, lastCheckedOn: '2026-03-15' }, '2026-12-02').dueOn).toBe('2026-09-15') // NFPA 70B 2023 Table 9.2.2: 6 months
    expect(nextDue({ condition: 1, lastCheckedOn: '2026-03-15', openFindingBand: 2 }, '2026-12-02').dueOn).toBe('2026-09-15') // halved, common practice
    expect(nextDue({ condition: 1, lastCheckedOn: '2026-03-15', assetIntervalMonths: 36 }, '2026-12-02').dueOn).toBe('2029-03-15')
  })
})

describe('dueStatus', () => {
  const today = '2026-12-02'
  it('sorts a due date into overdue, due within the window, or later', () => {
    expect(dueStatus('2026-12-01', today, 30)).toBe('overdue')
    expect(dueStatus(today, today, 30)).toBe('due')
    expect(dueStatus(addDays(today, 30), today, 30)).toBe('due')
    expect(dueStatus(addDays(today, 31), today, 30)).toBe('later')
    expect(dueStatus(addDays(today, 31), today, 60)).toBe('due')
    expect(dueStatus(addDays(today, 91), today, 90)).toBe('later')
  })
})
