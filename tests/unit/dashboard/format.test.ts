import { describe, expect, it } from 'vitest'
import { AGE_BUCKETS, COVERAGE_SITES_SHOWN, decimal, defaultFrom, percent, worstCovered } from '../../../shared/dashboard'
import { dashboardQuerySchema } from '../../../shared/schemas/dashboard'

describe('the dashboard period and formats', () => {
  it('defaults to twelve whole months ending on the given day', () => {
    // 2026-12-02 back one year is 2025-12-02; the day after starts the period (2025-12-03 … 2026-12-02 = 365 days).
    expect(defaultFrom('2026-12-02')).toBe('2025-12-03')
    // Across 29 February 2028: 2028-02-29 back one year → 2027-03-01 (JavaScript rolls 02-29 over), then + 1 day.
    expect(defaultFrom('2028-02-29')).toBe('2027-03-02')
  })

  it('covers every whole day once with the age buckets', () => {
    for (let i = 1; i < AGE_BUCKETS.length; i++) expect(AGE_BUCKETS[i]!.min).toBe((AGE_BUCKETS[i - 1]!.max ?? Number.NaN) + 1)
    expect(AGE_BUCKETS[0]!.min).toBe(0)
    expect(AGE_BUCKETS.at(-1)!.max).toBeNull()
  })

  it('formats rates and decimals, with a dash when there is nothing to divide', () => {
    expect(percent(3 / 9)).toBe('33.3 %')
    expect(percent(0.8)).toBe('80 %')
    expect(percent(null)).toBe('—')
    expect(decimal(500 / 7)).toBe('71.4')
    expect(decimal(null)).toBe('—')
  })

  it('reads one or several sites from the query, and refuses a period that ends before it starts', () => {
    const a = '0b6f9f5e-4a8e-4c52-9d0e-1c7f3a2b5d61'
    const b = '6f1c2d3e-5b4a-4c8d-8e9f-0a1b2c3d4e5f'
    expect(dashboardQuerySchema.parse({ site: a }).site).toEqual([a])
    expect(dashboardQuerySchema.parse({ site: [a, b] }).site).toEqual([a, b])
    expect(dashboardQuerySchema.parse({ site: `${a},${b}` }).site).toEqual([a, b])
    expect(dashboardQuerySchema.parse({}).site).toEqual([])
    expect(dashboardQuerySchema.safeParse({ site: 'nope' }).success).toBe(false)
    const backwards = dashboardQuerySchema.safeParse({ from: '2025-12-01', to: '2025-11-01' })
    expect(backwards.success).toBe(false)
    expect(backwards.error!.issues[0]!.path).toEqual(['to'])
  })
})

describe('the sites the coverage chart draws', () => {
  const site = (code: string, due: number, onTime: number) => ({ code, due, rate: due ? onTime / due : null })
  it('draws every site while there are at most the limit', () => {
    const sites = [site('A', 4, 4), site('B', 2, 0)]
    expect(worstCovered(sites, 2)).toEqual(sites)
  })
  it('past the limit draws the least covered (then the most due), in their listed order', () => {
    const sites = [site('A', 4, 4), site('B', 10, 5), site('C', 2, 1), site('D', 8, 0), site('E', 3, 3), site('F', 0, 0)]
    // Rates: A 1, B 0.5, C 0.5, D 0, E 1, F none due (counted as fully covered). Worst three: D, then B before C
    // (same rate, more due); shown in listed order.
    expect(worstCovered(sites, 3).map((s) => s.code)).toEqual(['B', 'C', 'D'])
    expect(worstCovered(sites, 1).map((s) => s.code)).toEqual(['D'])
  })
  it('draws 25 of a large utility’s sites', () => {
    const many = Array.from({ length: 5000 }, (_, i) => site(`S${String(i).padStart(4, '0')}`, 10, i % 11))
    const shown = worstCovered(many, COVERAGE_SITES_SHOWN)
    expect(COVERAGE_SITES_SHOWN).toBe(25)
    expect(shown).toHaveLength(25)
    expect(shown.every((s) => s.rate === 0)).toBe(true)
  })
})
