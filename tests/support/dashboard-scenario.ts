import type { Kysely } from 'kysely'
import { testDb } from './db'
import { insertAssets, insertSites } from './programme-fixtures'

// The dashboard's seeded scenario, written straight into the test database so that every figure has an answer worked
// out by hand (tests/e2e/dashboard.test.ts spells the arithmetic out). Dates in the fixed period 2025-07-01..2025-12-31
// do not depend on the day the test runs; the "today" figures use dates counted back from today.

export const PERIOD = { from: '2025-07-01', to: '2025-12-31' } as const

/** `today` minus `days`, as YYYY-MM-DD. */
export function daysBefore(today: string, days: number): string {
  const d = new Date(`${today}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() - days)
  return d.toISOString().slice(0, 10)
}

interface FindingSeed {
  asset: string
  component: string
  phase: string
  band: 1 | 2 | 3 | 4 | null
  reviewedBand?: 1 | 2 | 3 | 4
  closedOn?: string
  archived?: boolean
}

export interface Scenario {
  siteIds: Record<string, string>
  assetIds: Record<string, string>
  findingIds: Record<string, string>
}

/**
 * Two sites (N = North Yard, S = South Yard), ten assets (N1–N5, S1–S5, condition 1, the organisation's 12-month
 * interval; S4 has its own 6-month interval), surveys with checks on time and late, findings of every band and age,
 * a repeat, work orders in every backlog state and verifications that passed and failed.
 */
export async function seedDashboardScenario(orgId: string, userId: string, today: string, prefix = ''): Promise<Scenario> {
  const db = testDb() as unknown as Kysely<any>
  const siteIds = await insertSites(orgId, [
    { code: `${prefix}N`, name: `${prefix}North Yard`, lat: 54.1, lon: -2.9 },
    { code: `${prefix}S`, name: `${prefix}South Yard`, lat: 54.2, lon: -2.8 },
  ])
  const N = siteIds[`${prefix}N`]!
  const S = siteIds[`${prefix}S`]!
  const assetIds = await insertAssets(orgId, [
    ...['N1', 'N2', 'N3', 'N4', 'N5'].map((label) => ({ siteId: N, label })),
    ...['S1', 'S2', 'S3', 'S5'].map((label) => ({ siteId: S, label })),
    { siteId: S, label: 'S4', intervalMonths: 6 },
  ])
  const instrument = await db.insertInto('instruments')
    .values({ organisation_id: orgId, make: 'Halden', model: 'T8', serial: `${prefix}D-1`, band_from_um: 8, band_to_um: 14 })
    .returning('id').executeTakeFirstOrThrow()

  const checkIds: Record<string, string> = {}
  /** One survey on `date` with checks `[asset, outcome]`; a check's time is noon of the survey day. */
  async function survey(date: string, checks: Array<[string, 'clear' | 'finding' | 'not_reached']>, state = 'reviewed') {
    const s = await db.insertInto('surveys')
      .values({ organisation_id: orgId, planned_for: date, thermographer_id: userId, instrument_id: instrument.id, state })
      .returning('id').executeTakeFirstOrThrow()
    for (const [asset, outcome] of checks) {
      const c = await db.insertInto('checks').values({
        organisation_id: orgId, survey_id: s.id, asset_id: assetIds[asset], outcome,
        reason: outcome === 'not_reached' ? 'no_access' : null, created_at: `${date}T12:00:00Z`,
      }).returning('id').executeTakeFirstOrThrow()
      checkIds[`${asset}@${date}`] = c.id
    }
  }
  const findingIds: Record<string, string> = {}
  async function finding(key: string, date: string, f: FindingSeed) {
    const row = await db.insertInto('findings').values({
      organisation_id: orgId, check_id: checkIds[`${f.asset}@${date}`], component: f.component, phase: f.phase,
      apparent_c: 60, emissivity: 0.9, reflected_c: 20, reflected_method: 'direct', probable_cause: 'loose_connection',
      object_c: 62, band: f.band, criteria_id: 'neta-100-18', criteria_version: 1,
      reviewed_band: f.reviewedBand ?? null, review_reason: f.reviewedBand ? 'Load was low on the day' : null,
      reviewed_at: f.reviewedBand ? `${date}T18:00:00Z` : null,
      closed_at: f.closedOn ? `${f.closedOn}T12:00:00Z` : null, archived_at: f.archived ? `${date}T18:00:00Z` : null,
      created_at: `${date}T12:00:00Z`,
    }).returning('id').executeTakeFirstOrThrow()
    findingIds[key] = row.id
  }

  // Before the period.
  await survey('2024-03-01', [['S1', 'clear']])
  await survey('2024-09-15', [['N1', 'clear'], ['N2', 'clear'], ['N3', 'finding'], ['S5', 'not_reached']])
  await finding('F1', '2024-09-15', { asset: 'N3', component: 'Line-side connector', phase: 'L1', band: 2, closedOn: '2025-08-10' })
  await survey('2024-12-20', [['S2', 'clear']])
  await survey('2025-01-20', [['S4', 'clear']])
  await survey('2025-03-10', [['S3', 'clear']])
  // In the period.
  await survey('2025-07-15', [['S4', 'clear']])
  await survey('2025-08-01', [['N1', 'clear'], ['N3', 'finding']])
  await finding('F2', '2025-08-01', { asset: 'N3', component: ' line-side CONNECTOR ', phase: 'l1', band: 3, closedOn: '2025-11-20' })
  await survey('2025-10-05', [['N2', 'finding'], ['N4', 'clear'], ['S1', 'finding'], ['S3', 'finding'], ['S5', 'not_reached']])
  await finding('F3', '2025-10-05', { asset: 'N2', component: 'Bushing clamp', phase: 'H1', band: 1, closedOn: '2025-10-25' })
  await finding('F4', '2025-10-05', { asset: 'N2', component: 'Bushing clamp', phase: 'H2', band: 4 })
  await finding('F5', '2025-10-05', { asset: 'S3', component: 'Cable lug', phase: 'B', band: 2, reviewedBand: 1 })
  await finding('F6', '2025-10-05', { asset: 'S1', component: 'Disconnect jaw', phase: 'A', band: 2, closedOn: '2025-10-15' })
  // Still in the field (not handed in): neither its check nor its finding counts yet.
  await survey('2025-11-03', [['N5', 'finding']], 'in_progress')
  await finding('F11', '2025-11-03', { asset: 'N5', component: 'Not handed in', phase: 'A', band: 1 })
  // After the period, counted back from today.
  const t = (days: number) => daysBefore(today, days)
  await survey(t(100), [['S3', 'finding']])
  await finding('F10', t(100), { asset: 'S3', component: 'Fuse clip', phase: 'C', band: null })
  await survey(t(45), [['S4', 'finding']])
  await finding('F8', t(45), { asset: 'S4', component: 'Bus joint', phase: 'A', band: 2 })
  await survey(t(30), [['S2', 'clear']])
  await survey(t(10), [['N1', 'finding']])
  await finding('F7', t(10), { asset: 'N1', component: 'Breaker pad', phase: 'B', band: 3 })
  await finding('F9', t(10), { asset: 'N1', component: 'Recorded twice', phase: 'B', band: 1, archived: true })

  // Work orders: numbers per organisation; `created` is the day the work order was made.
  let number = 0
  async function workOrder(site: string, state: string, created: string, findings: string[]) {
    number += 1
    const w = await db.insertInto('work_orders').values({
      organisation_id: orgId, site_id: site, number, title: `Repair ${number}`, state,
      deferred_until: state === 'deferred' ? '2027-06-30' : null,
      closed_at: state === 'closed' ? `${created}T16:00:00Z` : null, created_at: `${created}T09:00:00Z`,
    }).returning('id').executeTakeFirstOrThrow()
    for (const f of findings) await db.insertInto('work_order_findings').values({ organisation_id: orgId, work_order_id: w.id, finding_id: findingIds[f] }).execute()
    return w.id as string
  }
  async function verification(wo: string, findingKey: string, site: string, state: string, recordedOn: string | null) {
    const recorded = state === 'passed' || state === 'failed'
    await db.insertInto('verifications').values({
      organisation_id: orgId, work_order_id: wo, finding_id: findingIds[findingKey], site_id: site, state,
      recorded_at: recorded ? `${recordedOn}T11:00:00Z` : null,
      apparent_c: recorded ? 30 : null, object_c: recorded ? 31 : null, emissivity: recorded ? 0.9 : null,
      instrument_id: recorded ? instrument.id : null,
    }).execute()
  }
  const wo1 = await workOrder(N, 'closed', '2025-07-01', ['F1'])
  await verification(wo1, 'F1', N, 'passed', '2025-08-10')
  const wo2 = await workOrder(N, 'closed', '2025-08-05', ['F2'])
  await verification(wo2, 'F2', N, 'failed', '2025-09-01')
  await verification(wo2, 'F2', N, 'passed', '2025-11-20')
  const wo3 = await workOrder(N, 'closed', '2025-10-06', ['F3'])
  await verification(wo3, 'F3', N, 'passed', '2025-10-25')
  const wo9 = await workOrder(S, 'closed', '2025-10-06', ['F6'])
  await verification(wo9, 'F6', S, 'passed', '2025-10-15')
  await workOrder(N, 'open', t(5), ['F7'])
  await workOrder(S, 'planned', t(40), ['F5'])
  await workOrder(S, 'deferred', t(400), [])
  await workOrder(S, 'cancelled', t(20), [])
  const wo8 = await workOrder(N, 'awaiting_verification', t(100), ['F4'])
  await verification(wo8, 'F4', N, 'waiting', null)
  await verification(wo8, 'F4', N, 'withdrawn', null)
  await verification(wo8, 'F4', N, 'failed', t(3))
  return { siteIds: { N, S }, assetIds, findingIds }
}
