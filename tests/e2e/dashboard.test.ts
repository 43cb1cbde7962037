import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase } from '../support/db'
import { orgIdOf } from '../support/programme-fixtures'
import { PERIOD, seedDashboardScenario, type Scenario } from '../support/dashboard-scenario'
import { todayIn } from '../../shared/schedule'

// Every expected value below is worked out by hand from the scenario in tests/support/dashboard-scenario.ts; the
// arithmetic is written next to it. The rules are the dashboard's own definitions (shared/dashboard.ts) and the
// schedule's defaults (12-month interval, open band-2 finding halves it: common practice, see shared/schedule.ts).

let owner: ApiClient
let slug: string
let scenario: Scenario
let other: { client: ApiClient; slug: string; scenario: Scenario }
const today = todayIn('UTC')

const url = (query: Record<string, string | string[]> = {}, path = '') => {
  const p = new URLSearchParams()
  for (const [k, v] of Object.entries(query)) for (const one of [v].flat()) p.append(k, one)
  return `/api/orgs/${slug}/dashboard${path}?${p}`
}

beforeAll(async () => {
  await resetDatabase()
  const a = await signUpOwner('Dana Board', 'dana@dashboard.test', 'Dana Power')
  owner = a.client
  slug = a.slug
  scenario = await seedDashboardScenario(await orgIdOf(slug), a.userId, today)
  // A second organisation with the very same rows: if any query lost its organisation condition, every count doubles.
  const b = await signUpOwner('Bea Other', 'bea@dashboard.test', 'Bea Power')
  other = { client: b.client, slug: b.slug, scenario: await seedDashboardScenario(await orgIdOf(b.slug), b.userId, today, 'B-') }
}, 120_000)

describe('dashboard figures for the period 2025-07-01..2025-12-31, all sites', () => {
  let body: any
  beforeAll(async () => {
    const res = await owner.get(url(PERIOD))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    body = res.body
  })

  it('echoes the period and today', () => {
    expect(body).toMatchObject({ from: '2025-07-01', to: '2025-12-31', today, siteIds: [] })
  })

  it('counts coverage: assets checked on time ÷ assets due, per site and overall', () => {
    // Due date at the period start = last counted check before 2025-07-01 + interval:
    //   N1 2024-09-15 + 12 mo = 2025-09-15, checked 2025-08-01            → on time
    //   N2 2024-09-15 + 12 mo = 2025-09-15, first check 2025-10-05         → late
    //   N3 2024-09-15, F1 (band 2) still open on 2025-07-01 (closed 08-10) → 12 × 0.5 = 6 mo → 2025-03-15;
    //      checked 2025-08-01                                               → late
    //   N4, N5 never checked before → due by the period end; N4 checked 10-05 → on time, N5 not checked → missed
    //      (N5's check of 11-03 is on a survey still in progress: it does not count yet)
    //   S1 2024-03-01 + 12 = 2025-03-01, checked 10-05                     → late
    //   S2 2024-12-20 + 12 = 2025-12-20, next check only after the period  → missed
    //   S3 2025-03-10 + 12 = 2026-03-10 > 2025-12-31                        → not due
    //   S4 2025-01-20 + 6 (own interval) = 2025-07-20, checked 07-15        → on time
    //   S5 only "not reached" → never checked → due by the end, not checked → missed
    // North: due 5 (N1–N5), on time 2, late 2, missed 1 → 2/5 = 0.4
    // South: due 4 (S1, S2, S4, S5), on time 1, late 1, missed 2 → 1/4 = 0.25
    // Overall: due 9, on time 3, late 3, missed 3 → 3/9
    expect(body.coverage).toMatchObject({ due: 9, onTime: 3, late: 3, missed: 3, siteCount: 2 })
    expect(body.coverage.rate).toBeCloseTo(3 / 9, 10)
    expect(body.coverage.sites.map((s: any) => [s.code, s.due, s.onTime, s.late, s.missed, s.rate])).toEqual([
      ['N', 5, 2, 2, 1, 0.4],
      ['S', 4, 1, 1, 2, 0.25],
    ])
  })

  it('counts overdue assets and sites today', () => {
    // Today's due date = last counted check + interval (the Due screen's rule):
    //   N2 2025-10-05 + 12 = 2026-10-05 (F4 open but band 4 does not shorten)  → overdue
    //   N3 2025-08-01 + 12 = 2026-08-01 (F1, F2 closed)                         → overdue
    //   N4 2025-10-05 + 12, S1 2025-10-05 + 12 (F6 closed)                      → overdue
    //   N1 (10 days ago), S2 (30 days ago), S3 (100 days ago, + 12 or + 6 mo), S4 (45 days ago + 3 mo) → not yet
    //   N5, S5 never checked → due today, not overdue
    // 4 assets (North 3, South 1) at 2 sites.
    expect(body.overdue).toMatchObject({ assets: 4, sites: 2 })
    expect(body.overdue.bySite.map((s: any) => [s.code, s.assets])).toEqual([['N', 3], ['S', 1]])
  })

  it('counts open findings by band (reviewed band first) and age, whatever the period', () => {
    // Open = not closed, not archived: F4 (band 4, 2025-10-05), F5 (band 2 reviewed to 1, 2025-10-05),
    // F7 (band 3, 10 days), F8 (band 2, 45 days), F10 (unranked, 100 days). F9 is archived; F1, F2, F3, F6 closed;
    // F11 (band 1) is on a survey still in progress.
    // Ages: 2025-10-05 is at least 423 days before 2026-12-02 → over 365.
    const none = { d0_30: 0, d31_90: 0, d91_365: 0, d366: 0 }
    expect(body.openFindings.total).toBe(5)
    expect(body.openFindings.byBand).toEqual([
      { band: 1, total: 1, ages: { ...none, d366: 1 } },
      { band: 2, total: 1, ages: { ...none, d31_90: 1 } },
      { band: 3, total: 1, ages: { ...none, d0_30: 1 } },
      { band: 4, total: 1, ages: { ...none, d366: 1 } },
      { band: null, total: 1, ages: { ...none, d91_365: 1 } },
    ])
  })

  it('counts findings per 100 assets checked', () => {
    // Findings on surveys in the period: F2 (08-01), F3, F4, F5, F6 (10-05) = 5.
    // Assets checked clear or with a finding in the period: S4 (07-15), N1, N3 (08-01), N2, N4, S1, S3 (10-05) = 7
    // (S5 was "not reached"). 5 × 100 / 7 = 71.428…
    expect(body.findingsPer100).toMatchObject({ findings: 5, assetsChecked: 7 })
    expect(body.findingsPer100.rate).toBeCloseTo(500 / 7, 10)
  })

  it('counts repeat findings on the same component', () => {
    // F2 on N3 "line-side CONNECTOR"/"l1" repeats F1 "Line-side connector"/"L1" (case and spaces ignored).
    // F3/F4 on N2 differ by phase (H1, H2): not a repeat. → 1 repeat finding on 1 component.
    expect(body.repeats).toEqual({ findings: 1, components: 1 })
  })

  it('counts the work-order backlog by state and age today', () => {
    // Not closed or cancelled: open (5 days), planned (40 days), awaiting verification (100 days), deferred (400 days).
    const none = { d0_30: 0, d31_90: 0, d91_365: 0, d366: 0 }
    expect(body.workOrders.backlog).toBe(4)
    expect(body.workOrders.ageing).toEqual([
      { state: 'open', total: 1, ages: { ...none, d0_30: 1 } },
      { state: 'planned', total: 1, ages: { ...none, d31_90: 1 } },
      { state: 'in_repair', total: 0, ages: none },
      { state: 'awaiting_verification', total: 1, ages: { ...none, d91_365: 1 } },
      { state: 'deferred', total: 1, ages: { ...none, d366: 1 } },
    ])
  })

  it('gives the median days from finding to verified repair per band', () => {
    // First passed verification in the period, minus the survey that found it:
    //   band 1: F3 2025-10-05 → 2025-10-25 = 20 days
    //   band 2: F1 2024-09-15 → 2025-08-10 = 365 (to 2025-09-15) − 36 (08-10 → 09-15: 21 + 15) = 329 days;
    //           F6 2025-10-05 → 2025-10-15 = 10 days; median of two = (10 + 329) / 2 = 169.5
    //   band 3: F2 2025-08-01 → 2025-11-20 = 111 days (the failed re-scan of 09-01 does not count)
    expect(body.workOrders.timeToRepair).toEqual([
      { band: 1, repaired: 1, medianDays: 20 },
      { band: 2, repaired: 2, medianDays: 169.5 },
      { band: 3, repaired: 1, medianDays: 111 },
    ])
  })

  it('gives the verification pass rate', () => {
    // Recorded in the period: passed F1 08-10, F6 10-15, F3 10-25, F2 11-20; failed F2 09-01 → 4 / 5 = 0.8.
    // Left out: the waiting and withdrawn ones, and the failure 3 days ago (after the period).
    expect(body.workOrders.verification).toEqual({ recorded: 5, passed: 4, failed: 1, rate: 0.8 })
  })
})

describe('filters', () => {
  it('narrows every figure to the chosen sites', async () => {
    const res = await owner.get(url({ ...PERIOD, site: scenario.siteIds.S! }))
    expect(res.status).toBe(200)
    const b = res.body
    expect(b.siteIds).toEqual([scenario.siteIds.S])
    // South only: coverage 1 of 4 (see above); overdue S1; open F5, F8, F10.
    expect(b.coverage).toMatchObject({ due: 4, onTime: 1, late: 1, missed: 2, rate: 0.25 })
    expect(b.coverage.sites).toHaveLength(1)
    expect(b.overdue).toMatchObject({ assets: 1, sites: 1 })
    expect(b.openFindings.total).toBe(3)
    // Findings F5, F6 on assets S4, S1, S3 checked → 2 × 100 / 3.
    expect(b.findingsPer100).toMatchObject({ findings: 2, assetsChecked: 3 })
    expect(b.findingsPer100.rate).toBeCloseTo(200 / 3, 10)
    expect(b.repeats).toEqual({ findings: 0, components: 0 })
    // Planned (40 days) and deferred (400 days); F6 repaired in 10 days; 1 of 1 verification passed.
    expect(b.workOrders.backlog).toBe(2)
    expect(b.workOrders.timeToRepair).toEqual([{ band: 2, repaired: 1, medianDays: 10 }])
    expect(b.workOrders.verification).toEqual({ recorded: 1, passed: 1, failed: 0, rate: 1 })
  })

  it('recomputes the period figures for October 2025, and keeps the "today" figures', async () => {
    const res = await owner.get(url({ from: '2025-10-01', to: '2025-10-31' }))
    const b = res.body
    // Due at 2025-10-01: N2 (2025-09-15, checked 10-05 → late), N3 (08-01 + 12, F2 band 3 open → not shortened →
    // 2026-08-01, not due), N1 (2026-08-01, not due), N4 (never → on time 10-05), N5 (never → missed),
    // S1 (2025-03-01 → late), S2 (2025-12-20, not due), S3 (2026-03-10), S4 (07-15 + 6 = 2026-01-15, not due),
    // S5 (never, only "not reached" → missed). Due 5, on time 1, late 2, missed 2 → 1/5 = 0.2.
    expect(b.coverage).toMatchObject({ due: 5, onTime: 1, late: 2, missed: 2, rate: 0.2 })
    // F3, F4, F5, F6 on N2, S1, S3 (+ N4 clear) → 4 × 100 / 4 = 100.
    expect(b.findingsPer100).toEqual({ findings: 4, assetsChecked: 4, rate: 100 })
    expect(b.repeats.findings).toBe(0)
    // Verified in October: F3 (band 1, 20 days), F6 (band 2, 10 days); both passed.
    expect(b.workOrders.timeToRepair).toEqual([{ band: 1, repaired: 1, medianDays: 20 }, { band: 2, repaired: 1, medianDays: 10 }])
    expect(b.workOrders.verification).toEqual({ recorded: 2, passed: 2, failed: 0, rate: 1 })
    // Not limited by the period.
    expect(b.overdue.assets).toBe(4)
    expect(b.openFindings.total).toBe(5)
    expect(b.workOrders.backlog).toBe(4)
  })

  it('defaults to the twelve months that end today', async () => {
    const res = await owner.get(`/api/orgs/${slug}/dashboard`)
    expect(res.status).toBe(200)
    expect(res.body.to).toBe(today)
    const from = new Date(`${today}T00:00:00Z`)
    from.setUTCFullYear(from.getUTCFullYear() - 1)
    from.setUTCDate(from.getUTCDate() + 1)
    expect(res.body.from).toBe(from.toISOString().slice(0, 10))
  })

  it('refuses a period that ends before it starts, at the field', async () => {
    const res = await owner.get(url({ from: '2025-12-01', to: '2025-11-01' }))
    expect(res.status).toBe(400)
    expect(res.body.data.fieldErrors.to[0]).toMatch(/end on or after/)
    const bad = await owner.get(url({ site: 'not-a-site' }))
    expect(bad.status).toBe(400)
  })

  it('counts nothing for a site of another organisation', async () => {
    const res = await owner.get(url({ ...PERIOD, site: other.scenario.siteIds.S! }))
    expect(res.status).toBe(200)
    expect(res.body.coverage).toMatchObject({ due: 0, onTime: 0, rate: null })
    expect(res.body.openFindings.total).toBe(0)
    expect(res.body.workOrders.backlog).toBe(0)
  })
})

describe('the lists behind the figures', () => {
  it('lists the assets behind coverage, missed first, filtered by status', async () => {
    const all = await owner.get(url({ ...PERIOD, pageSize: '20' }, '/coverage'))
    expect(all.status).toBe(200)
    expect(all.body.total).toBe(9)
    expect(all.body.items.map((r: any) => [r.label, r.status])).toEqual([
      ['N5', 'missed'], ['S2', 'missed'], ['S5', 'missed'],
      ['N2', 'late'], ['N3', 'late'], ['S1', 'late'],
      ['N1', 'on_time'], ['N4', 'on_time'], ['S4', 'on_time'],
    ])
    const n3 = all.body.items.find((r: any) => r.label === 'N3')
    expect(n3).toMatchObject({ dueOn: '2025-03-15', lastBefore: '2024-09-15', firstCheckedOn: '2025-08-01' })
    expect(all.body.items.find((r: any) => r.label === 'N4')).toMatchObject({ dueOn: null, lastBefore: null, firstCheckedOn: '2025-10-05' })
    const late = await owner.get(url({ ...PERIOD, status: 'late', site: scenario.siteIds.N! }, '/coverage'))
    expect(late.body.items.map((r: any) => r.label)).toEqual(['N2', 'N3'])
  })

  it('lists the components behind the repeat figure', async () => {
    const res = await owner.get(url(PERIOD, '/repeats'))
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(1)
    expect(res.body.items[0]).toMatchObject({
      assetId: scenario.assetIds.N3, assetLabel: 'N3', siteName: 'North Yard', findings: 2, repeatsInPeriod: 1,
      firstFoundOn: '2024-09-15', lastFoundOn: '2025-08-01', lastBand: 3,
    })
  })

  it('lists the re-scans behind the repair and verification figures', async () => {
    const all = await owner.get(url(PERIOD, '/verifications'))
    expect(all.status).toBe(200)
    // Recorded in the period, newest first; days = recorded − found (see the medians above).
    expect(all.body.total).toBe(5)
    expect(all.body.items.map((r: any) => [r.recordedOn, r.result, r.firstPass, r.days])).toEqual([
      ['2025-11-20', 'passed', true, 111],
      ['2025-10-25', 'passed', true, 20],
      ['2025-10-15', 'passed', true, 10],
      ['2025-09-01', 'failed', false, 31], // F2 found 2025-08-01; August has 31 days
      ['2025-08-10', 'passed', true, 329],
    ])
    // The band-2 repairs behind the median 169.5: 10 and 329 days.
    const band2 = await owner.get(url({ ...PERIOD, band: '2', result: 'passed', firstPass: 'true' }, '/verifications'))
    expect(band2.body.items.map((r: any) => r.days)).toEqual([10, 329])
  })

  it('filters the findings list the way the dashboard links do', async () => {
    const findings = (q: string) => owner.get(`/api/orgs/${slug}/findings?pageSize=50&${q}`)
    // Open: F4, F5, F7, F8, F10 (as the open-findings figure).
    const open = await findings('open=true')
    expect(open.body.items.map((f: any) => f.component).sort()).toEqual(['Breaker pad', 'Bus joint', 'Bushing clamp', 'Cable lug', 'Fuse clip'])
    // Open, band 1 (reviewed band counts), South Yard: F5 only.
    const south = await findings(`open=true&band=1&siteId=${scenario.siteIds.S}`)
    expect(south.body.items.map((f: any) => f.component)).toEqual(['Cable lug'])
    // Recorded in the period and counted: F2, F3, F4, F5, F6 = the 5 of the findings-per-100 figure; F11's survey is
    // still in progress, so it shows only without counted=true.
    const counted = await findings(`counted=true&from=${PERIOD.from}&to=${PERIOD.to}`)
    expect(counted.body.total).toBe(5)
    const all = await findings(`from=${PERIOD.from}&to=${PERIOD.to}`)
    expect(all.body.total).toBe(6)
  })
})
