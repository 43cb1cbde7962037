// The findings list past a thousand findings: the count stops a thousand rows after the page's first row and says so
// (totalCapped), pages keep their order and reach the last finding, and the recorded-on filters keep the
// organisation's local day at a midnight that is not UTC's. See server/services/finding-list-sql.ts.
import { sql } from 'kysely'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'

const CAP = 1000
const COPIES = 1101 // with the two recorded through the API: 1 103 findings
let owner: ApiClient
let slug: string
let band2Id: string

beforeAll(async () => {
  await resetDatabase()
  let userId: string
  ;({ client: owner, slug, userId } = await signUpOwner('Lena Scale', 'lena@scale.test', 'Scale Power'))
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'S1', name: 'Scale yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })
  const t1 = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'T1', assetClass: 'transformer' })).body.id
  const t2 = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'T2', assetClass: 'transformer' })).body.id
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'S-900', bandFromUm: 8, bandToUm: 14 })
  const plan = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-06-30', thermographerId: userId, instrumentId: inst.body.id, siteIds: [site.body.id] })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  const url = (p: string) => `/api/orgs/${slug}/surveys/${plan.body.id}${p}`
  expect((await owner.post(url('/start'), { version: plan.body.version })).status).toBeLessThan(300)
  const base = { emissivity: 0.9, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 3, probableCause: 'loose_connection' }
  // Over reference 30 K: band 1 (ANSI/NETA Table 100.18, over 15 °C); over ambient 25 K only: band 2 (21–40 °C).
  for (const [assetId, reading] of [[t1, { apparentC: 60, referenceC: 30, ambientC: 20 }], [t2, { apparentC: 45, ambientC: 20 }]] as const) {
    expect((await owner.post(url('/checks'), { assetId, outcome: 'finding' })).status).toBeLessThan(300)
    const f = await owner.post(url('/findings'), { ...base, ...reading, assetId, component: `Clamp on ${assetId === t1 ? 'T1' : 'T2'}` })
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    if (assetId === t2) band2Id = f.body.id
  }
  const band1 = await owner.get(`/api/orgs/${slug}/findings?band=1`)
  expect(band1.body.total).toBe(1)
  // A utility's worth of band-1 findings on T1 (copies of the recorded one, one minute apart), and an organisation on
  // New Zealand time, whose midnight is 12:00 UTC in June.
  const db = testDb()
  const org = await db.selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()
  await sql`update organisations set time_zone = 'Pacific/Auckland' where id = ${org.id}`.execute(db)
  await sql`insert into findings (organisation_id, check_id, component, phase, apparent_c, reference_c, ambient_c, emissivity, reflected_c,
      reflected_method, distance_m, probable_cause, object_c, rise_over_reference_k, rise_over_ambient_k, band, band_basis, action,
      repair_deadline_days, uncertainty_low_c, uncertainty_high_c, warnings, criteria_id, criteria_version, created_at, updated_at)
    select f.organisation_id, f.check_id, f.component || ' #' || g, f.phase, f.apparent_c, f.reference_c, f.ambient_c, f.emissivity,
      f.reflected_c, f.reflected_method, f.distance_m, f.probable_cause, f.object_c, f.rise_over_reference_k, f.rise_over_ambient_k, f.band,
      f.band_basis, f.action, f.repair_deadline_days, f.uncertainty_low_c, f.uncertainty_high_c, f.warnings, f.criteria_id, f.criteria_version,
      timestamptz '2026-06-30 11:00:00+00' + g * interval '1 minute', now()
    from findings f cross join generate_series(1, ${COPIES}) g
    where f.id = ${band1.body.items[0].id}`.execute(db)
}, 120_000)

describe('the findings list of a large organisation', () => {
  it('counts a thousand past the first row of the page and says there are more', async () => {
    const first = await owner.get(`/api/orgs/${slug}/findings?pageSize=50`)
    expect(first.status).toBe(200)
    expect(first.body).toMatchObject({ total: CAP, totalCapped: true, page: 1, pageSize: 50 })
    expect(first.body.items).toHaveLength(50)
    // One survey: the most severe band first, then in the order recorded (the copies were dated June, before the two
    // recorded through the API today).
    expect(first.body.items.slice(0, 2).map((f: { component: string }) => f.component)).toEqual(['Clamp on T1 #1', 'Clamp on T1 #2'])
    const third = await owner.get(`/api/orgs/${slug}/findings?pageSize=50&page=3`)
    expect(third.body).toMatchObject({ total: 100 + CAP, totalCapped: true })
    expect(third.body.items[0].component).toBe('Clamp on T1 #101')
  })

  it('gives the exact total once the rest fits under the cap, and the last page ends with the band-2 finding', async () => {
    const last = await owner.get(`/api/orgs/${slug}/findings?pageSize=50&page=23`)
    expect(last.body.total).toBe(COPIES + 2)
    expect(last.body.totalCapped).toBeUndefined()
    expect(last.body.items.map((f: { component: string }) => f.component)).toEqual([`Clamp on T1 #${COPIES}`, 'Clamp on T1', 'Clamp on T2'])
    expect(last.body.items[2].id).toBe(band2Id)
    const band2 = await owner.get(`/api/orgs/${slug}/findings?band=2`)
    expect(band2.body).toMatchObject({ total: 1, page: 1 })
    expect(band2.body.totalCapped).toBeUndefined()
  })

  it('filters by the day recorded in the organisation’s time zone (Pacific/Auckland, UTC+12 in June)', async () => {
    // Copy g was recorded at 11:00 + g min UTC = 23:00 + g min in Auckland: copies 1–59 on 30 June, 60 onwards on 1 July.
    const june30 = await owner.get(`/api/orgs/${slug}/findings?pageSize=100&from=2026-06-30&to=2026-06-30&band=1`)
    expect(june30.body.total).toBe(59)
    expect(june30.body.items.map((f: { component: string }) => f.component).at(-1)).toBe('Clamp on T1 #59')
    const july1 = await owner.get(`/api/orgs/${slug}/findings?pageSize=50&from=2026-07-01&band=1`)
    expect(july1.body).toMatchObject({ total: CAP, totalCapped: true })
    expect(july1.body.items[0].component).toBe('Clamp on T1 #60')
  })
})
