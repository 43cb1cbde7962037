import { describe, expect, it } from 'vitest'
import { DEFAULT_REPAIR_DEADLINES, earlierDate, isOverdue, mostSevereBand, repairDaysFor, repairDueOn, workOrderReference } from '../../../shared/work-orders'
import { WORK_ORDER_MOVES, verificationReadingSchema, workOrderDeferSchema, workOrderListQuerySchema, workOrderRaiseSchema } from '../../../shared/schemas/work-order'

describe('repair deadlines', () => {
  it('defaults to band 1 within a day, band 2 in 30 days, band 3 in 180 days, band 4 none (reference sheet §6, common practice)', () => {
    expect(DEFAULT_REPAIR_DEADLINES).toEqual({ repairDaysBand1: 1, repairDaysBand2: 30, repairDaysBand3: 180, repairDaysBand4: null })
  })

  it('takes the most severe band (1 is the most severe); unranked findings do not count', () => {
    expect(mostSevereBand([3, null, 2, 4])).toBe(2)
    expect(mostSevereBand([null, undefined])).toBeNull()
    expect(mostSevereBand([])).toBeNull()
  })

  it('dates the work order from today plus the band\'s days, across month and year ends', () => {
    expect(repairDueOn([2, 4], DEFAULT_REPAIR_DEADLINES, '2026-12-15')).toBe('2027-01-14')
    expect(repairDueOn([1], DEFAULT_REPAIR_DEADLINES, '2026-02-28')).toBe('2026-03-01')
    expect(repairDueOn([3], DEFAULT_REPAIR_DEADLINES, '2026-01-01')).toBe('2026-06-30')
  })

  it('gives no due date for record-and-trend bands and unranked findings, and follows an organisation\'s own days', () => {
    expect(repairDueOn([4], DEFAULT_REPAIR_DEADLINES, '2026-12-15')).toBeNull()
    expect(repairDueOn([null], DEFAULT_REPAIR_DEADLINES, '2026-12-15')).toBeNull()
    const own = { ...DEFAULT_REPAIR_DEADLINES, repairDaysBand1: 3, repairDaysBand4: 365 }
    expect(repairDaysFor(1, own)).toBe(3)
    expect(repairDueOn([4], own, '2026-01-01')).toBe('2027-01-01')
  })
})

describe('overdue and references', () => {
  it('is overdue only past the due date and while it is someone\'s to do', () => {
    expect(isOverdue('open', '2026-12-01', '2026-12-02')).toBe(true)
    expect(isOverdue('deferred', '2026-12-01', '2026-12-02')).toBe(true)
    expect(isOverdue('open', '2026-12-02', '2026-12-02')).toBe(false)
    expect(isOverdue('awaiting_verification', '2026-12-01', '2026-12-02')).toBe(false)
    expect(isOverdue('closed', '2026-12-01', '2026-12-02')).toBe(false)
    expect(isOverdue('open', null, '2026-12-02')).toBe(false)
  })

  it('picks the earlier of two dates and writes references as WO-n', () => {
    expect(earlierDate('2026-12-01', '2026-11-30')).toBe('2026-11-30')
    expect(earlierDate(null, '2026-11-30')).toBe('2026-11-30')
    expect(earlierDate(null, null)).toBeNull()
    expect(workOrderReference(42)).toBe('WO-42')
  })
})

describe('schemas', () => {
  it('never moves a work order out of closed or cancelled, and closes only through a verification', () => {
    expect(WORK_ORDER_MOVES.closed).toEqual([])
    expect(WORK_ORDER_MOVES.cancelled).toEqual([])
    for (const moves of Object.values(WORK_ORDER_MOVES)) expect(moves).not.toContain('closed' as never)
    expect(WORK_ORDER_MOVES.in_repair).toContain('awaiting_verification')
    expect(WORK_ORDER_MOVES.open).not.toContain('awaiting_verification')
  })

  it('refuses a raise without findings or with a finding twice', () => {
    const id = '00000000-0000-4000-8000-000000000001'
    expect(workOrderRaiseSchema.safeParse({ findingIds: [] }).success).toBe(false)
    expect(workOrderRaiseSchema.safeParse({ findingIds: [id, id] }).success).toBe(false)
    expect(workOrderRaiseSchema.safeParse({ findingIds: [id] }).success).toBe(true)
  })

  it('wants a reason and a date to defer', () => {
    const r = workOrderDeferSchema.safeParse({ reason: 'x', until: '2026-13-01', version: 1 })
    expect(r.success).toBe(false)
    expect(r.error!.issues.map((i) => i.path[0]).sort()).toEqual(['reason', 'until'])
  })

  it('reads list flags from the query string', () => {
    expect(workOrderListQuerySchema.parse({ mine: 'true', overdue: '0' })).toMatchObject({ mine: true, overdue: false, sort: 'due', page: 1 })
    expect(workOrderListQuerySchema.safeParse({ state: 'finished' }).success).toBe(false)
  })

  it('takes a re-scan with the finding form\'s rules (reference not hotter than the hot spot) and the imager', () => {
    const base = { apparentC: '40', emissivity: '0.9', reflectedC: '20', reflectedMethod: 'direct', instrumentId: '00000000-0000-4000-8000-000000000001', version: 1 }
    expect(verificationReadingSchema.safeParse(base).success).toBe(true)
    const hotter = verificationReadingSchema.safeParse({ ...base, referenceC: '45' })
    expect(hotter.error!.issues[0]!.path).toEqual(['referenceC'])
    expect(verificationReadingSchema.safeParse({ ...base, instrumentId: '' }).success).toBe(false)
  })
})
