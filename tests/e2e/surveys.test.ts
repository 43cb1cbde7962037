import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase } from '../support/db'
import { NETA_100_18, rankRise } from '../../shared/thermal/index'

let owner: ApiClient
let slug: string
let instrumentId: string
let routeId: string
const sites: Record<string, string> = {}
const assets: Record<string, string> = {}
const people: Record<string, { client: ApiClient; id: string }> = {}

async function join(key: string, role: string, email: string) {
  people[key] = await joinByInvitation(owner, slug, email, role, `Survey ${key}`, 'survey password')
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Sue Planner', 'sue@surveys.test', 'Sue Power'))
  await join('thermo', 'thermographer', 'theo@surveys.test')
  await join('other', 'thermographer', 'olga@surveys.test')
  await join('viewer', 'viewer', 'vic@surveys.test')
  for (const [code, lat] of [['N1', 54.1], ['N2', 54.2]] as const) {
    const s = await owner.post(`/api/orgs/${slug}/sites`, { code, name: `North ${code}`, kind: 'substation', latitude: lat, longitude: -2.9 })
    sites[code] = s.body.id
  }
  for (const [label, site] of [['T1', 'N1'], ['CB1', 'N1'], ['T2', 'N2']] as const) {
    const a = await owner.post(`/api/orgs/${slug}/assets`, { siteId: sites[site], label, assetClass: 'transformer' })
    assets[label] = a.body.id
  }
  // An 8–14 µm imager, so the reading below is the one of reference sheet §5.
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'S-814', bandFromUm: 8, bandToUm: 14 })
  instrumentId = inst.body.id
  const route = await owner.post(`/api/orgs/${slug}/routes`, {
    name: 'North loop', baseName: 'Depot', baseLatitude: 54, baseLongitude: -3, recurrenceMonths: 12, siteIds: [sites.N2, sites.N1],
  })
  routeId = route.body.id
}, 60_000)

const reading = {
  component: 'Line-side connector', phase: 'L2',
  apparentC: 50, ambientC: 20, emissivity: 0.5, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 3,
  probableCause: 'loose_connection',
}

describe('a survey from plan to review', () => {
  let surveyId: string
  let version: number
  const url = (p = '') => `/api/orgs/${slug}/surveys/${surveyId}${p}`

  it('plans a survey from a route, with the sites in route order', async () => {
    const res = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: people.thermo!.id, instrumentId, routeId })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    surveyId = res.body.id
    version = res.body.version
    expect(res.body.state).toBe('planned')
    expect(res.body.sites.map((s: { code: string }) => s.code)).toEqual(['N2', 'N1'])
    expect(res.body.sites[1].assets.map((a: { label: string }) => a.label)).toEqual(['CB1', 'T1'])
    expect(res.body.summary).toMatchObject({ assets: 3, unchecked: 3 })
  })

  it('refuses a plan without a route or sites, and a thermographer from nowhere, at their fields', async () => {
    const none = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: people.thermo!.id, instrumentId })
    expect(none.status).toBe(400)
    expect(none.body.data.fieldErrors.routeId[0]).toMatch(/route/)
    const stranger = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: '00000000-0000-4000-8000-000000000000', instrumentId, siteIds: [sites.N1] })
    expect(stranger.status).toBe(400)
    expect(stranger.body.data.fieldErrors.thermographerId).toBeTruthy()
    const badDate = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2/12/2026', thermographerId: people.thermo!.id, instrumentId, siteIds: [sites.N1] })
    expect(badDate.body.data.fieldErrors.plannedFor).toBeTruthy()
  })

  it('shows the thermographer the survey of the day, and nobody else', async () => {
    const mine = await people.thermo!.client.get(`/api/orgs/${slug}/surveys/today?date=2026-12-02`)
    expect(mine.status).toBe(200)
    expect(mine.body.survey.id).toBe(surveyId)
    const other = await people.other!.client.get(`/api/orgs/${slug}/surveys/today?date=2026-12-02`)
    expect(other.body.survey).toBeNull()
  })

  it('lists surveys with server-side filters and pagination', async () => {
    await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-09', thermographerId: people.other!.id, instrumentId, siteIds: [sites.N1] })
    const all = await people.viewer!.client.get(`/api/orgs/${slug}/surveys?pageSize=1&sort=date`)
    expect(all.status).toBe(200)
    expect(all.body.total).toBe(2)
    expect(all.body.items).toHaveLength(1)
    expect(all.body.items[0].plannedFor).toBe('2026-12-02')
    const filtered = await owner.get(`/api/orgs/${slug}/surveys?thermographerId=${people.other!.id}`)
    expect(filtered.body.items.map((s: { plannedFor: string }) => s.plannedFor)).toEqual(['2026-12-09'])
    const planned = await owner.get(`/api/orgs/${slug}/surveys?state=submitted`)
    expect(planned.body.total).toBe(0)
  })

  it('lets only the assigned thermographer start and record (403 with a clear message otherwise)', async () => {
    for (const c of [people.other!.client, owner]) {
      const res = await c.post(url('/start'), { version })
      expect(res.status).toBe(403)
      expect(res.body.data.message).toMatch(/Only the thermographer assigned/)
    }
    const viewer = await people.viewer!.client.post(url('/checks'), { assetId: assets.T1, outcome: 'clear' })
    expect(viewer.status).toBe(403)
    const early = await people.thermo!.client.post(url('/checks'), { assetId: assets.T1, outcome: 'clear' })
    expect(early.status).toBe(409)
    const start = await people.thermo!.client.post(url('/start'), { version })
    expect(start.status, JSON.stringify(start.body)).toBe(200)
    expect(start.body.state).toBe('in_progress')
    version = start.body.version
    const intruder = await people.other!.client.post(url('/checks'), { assetId: assets.T1, outcome: 'clear' })
    expect(intruder.status).toBe(403)
    expect(intruder.body.data.message).toMatch(/Only the thermographer assigned/)
  })

  it('records field conditions and checks', async () => {
    const t = people.thermo!.client
    const cond = await t.post(url('/conditions'), { siteId: sites.N1, ambientC: 20, windMs: 1.5, humidityPct: 60, sky: 'overcast', loadNotes: 'Feeder at about 70 %' })
    expect(cond.status, JSON.stringify(cond.body)).toBe(200)
    const n1 = cond.body.sites.find((s: { code: string }) => s.code === 'N1')
    expect(n1.conditions).toEqual({ ambientC: 20, windMs: 1.5, humidityPct: 60, sky: 'overcast', loadNotes: 'Feeder at about 70 %' })
    const clear = await t.post(url('/checks'), { assetId: assets.CB1, outcome: 'clear' })
    expect(clear.status).toBe(200)
    expect(clear.body.summary).toMatchObject({ clear: 1, unchecked: 2 })
  })

  it('stores a finding with the band and temperatures computed on the server', async () => {
    const res = await people.thermo!.client.post(url('/findings'), {
      ...reading, assetId: assets.T1,
      // Figures a client might send are ignored: the server computes them.
      objectC: 999, band: 4,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    // reference sheet §5 [C] independent computation: 8–14 µm, T_app 50 °C, ε 0.50, T_refl 20 °C, τ = 1 → 74.340 °C
    expect(res.body.objectC).toBeCloseTo(74.34, 2)
    expect(res.body.riseOverAmbientK).toBeCloseTo(54.34, 2)
    // ANSI/NETA Table 100.18: a rise over ambient above 40 K is the most severe band.
    expect(res.body.band).toBe(1)
    expect(res.body.band).toBe(rankRise({ overAmbientK: res.body.riseOverAmbientK }, NETA_100_18).band)
    expect(res.body.bandBasis).toBe('overAmbient')
    expect(res.body.criteriaId).toBe('neta-100-18')
    expect(res.body.criteriaVersion).toBe(NETA_100_18.version)
    expect(res.body.repairDeadlineDays).toBe(1)
    // The interval brackets the value (ε ± 0.02, reflected ± 5 K).
    expect(res.body.uncertaintyLowC).toBeLessThan(74.34)
    expect(res.body.uncertaintyHighC).toBeGreaterThan(74.34)
    // No load recorded and ε 0.5: the engine's warnings are stored with the finding.
    expect(res.body.warnings.map((w: { code: string }) => w.code)).toContain('load-not-recorded')
    expect(res.body.inputs).toMatchObject({ apparentC: 50, emissivity: 0.5, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 3 })
    const survey = await owner.get(url())
    const t1 = survey.body.sites.flatMap((s: { assets: unknown[] }) => s.assets).find((a: { label: string }) => a.label === 'T1')
    expect(t1.check.outcome).toBe('finding')
    expect(t1.findings).toHaveLength(1)
    expect(survey.body.summary.byBand).toEqual({ 1: 1 })
    // A check holding a finding cannot be turned into "clear": the finding is kept.
    const flip = await people.thermo!.client.post(url('/checks'), { assetId: assets.T1, outcome: 'clear' })
    expect(flip.status).toBe(409)
    expect(flip.body.data.fieldErrors.outcome[0]).toMatch(/stays a finding/)
  })

  it('scales the rise with the load (square law)', async () => {
    const res = await people.thermo!.client.post(url('/findings'), {
      ...reading, assetId: assets.T1, component: 'Load-side connector', emissivity: 0.95, referenceC: 45, loadA: 300, ratedA: 600,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    // Common practice: rise at full load ≈ measured rise × (rated / load)^2, here × 4.
    expect(res.body.loadScaledRiseK).toBeCloseTo(res.body.riseOverReferenceK * 4, 6)
  })

  it('answers bad readings with messages at their fields', async () => {
    const t = people.thermo!.client
    const cases: Array<[Record<string, unknown>, string, RegExp]> = [
      [{ apparentC: -300 }, 'apparentC', /absolute zero/],
      [{ emissivity: 1.2 }, 'emissivity', /above 0 and up to 1/],
      [{ emissivity: 0 }, 'emissivity', /above 0 and up to 1/],
      [{ transmittance: 1.5 }, 'transmittance', /above 0 and up to 1/],
      [{ referenceC: 60 }, 'referenceC', /hotter than the hot spot/],
      [{ loadA: 2000, ratedA: 600 }, 'loadA', /over 3 ×/],
      [{ loadA: 200 }, 'ratedA', /both/],
      [{ apparentC: 'warm' }, 'apparentC', /as a number/],
      [{ component: '' }, 'component', /Name the component/],
    ]
    for (const [change, field, message] of cases) {
      const res = await t.post(url('/findings'), { ...reading, assetId: assets.T2, ...change })
      expect(res.status, `${field}: ${JSON.stringify(res.body)}`).toBe(400)
      expect(res.body.data.fieldErrors[field]?.join(' '), field).toMatch(message)
    }
    const notReason = await t.post(url('/checks'), { assetId: assets.T2, outcome: 'not_reached' })
    expect(notReason.body.data.fieldErrors.reason[0]).toMatch(/why/)
    const wrongAsset = await t.post(url('/checks'), { assetId: '00000000-0000-4000-8000-000000000000', outcome: 'clear' })
    expect(wrongAsset.body.data.fieldErrors.assetId).toBeTruthy()
  })

  it('cannot be submitted with an asset left unchecked', async () => {
    const s = await owner.get(url())
    const res = await people.thermo!.client.post(url('/submit'), { version: s.body.version })
    expect(res.status).toBe(400)
    expect(res.body.data.message).toMatch(/1 asset has no check/)
  })

  it('submits, is returned with comments, resubmits and is marked reviewed', async () => {
    const t = people.thermo!.client
    const nr = await t.post(url('/checks'), { assetId: assets.T2, outcome: 'not_reached', reason: 'outage', note: 'Bay switched out' })
    expect(nr.status).toBe(200)
    expect(nr.body.summary).toMatchObject({ assets: 3, clear: 1, finding: 1, notReached: 1, unchecked: 0 })
    const submitted = await t.post(url('/submit'), { version: nr.body.version })
    expect(submitted.body.state).toBe('submitted')
    const late = await t.post(url('/checks'), { assetId: assets.T2, outcome: 'clear' })
    expect(late.status).toBe(409)

    const byThermo = await t.post(url('/review'), { decision: 'reviewed', version: submitted.body.version })
    expect(byThermo.status).toBe(403)
    const noComment = await owner.post(url('/review'), { decision: 'returned', version: submitted.body.version })
    expect(noComment.body.data.fieldErrors.comments).toBeTruthy()
    const stale = await owner.post(url('/review'), { decision: 'returned', comments: 'Re-check T2', version: submitted.body.version - 1 })
    expect(stale.status).toBe(409)
    const returned = await owner.post(url('/review'), { decision: 'returned', comments: 'Re-check T2 when the bay is back.', version: submitted.body.version })
    expect(returned.status).toBe(200)
    expect(returned.body).toMatchObject({ state: 'returned', reviewComments: 'Re-check T2 when the bay is back.' })

    const recheck = await t.post(url('/checks'), { assetId: assets.T2, outcome: 'clear' })
    expect(recheck.body.summary).toMatchObject({ clear: 2, notReached: 0 })
    const again = await t.post(url('/submit'), { version: recheck.body.version })
    expect(again.body.state).toBe('submitted')
    const reviewed = await owner.post(url('/review'), { decision: 'reviewed', comments: '', version: again.body.version })
    expect(reviewed.body.state).toBe('reviewed')
  })

  it('lists findings by band for every role', async () => {
    const res = await people.viewer!.client.get(`/api/orgs/${slug}/findings?band=1`)
    expect(res.status).toBe(200)
    // Both readings on T1 rank in band 1 (the second after load scaling); none other does.
    expect(res.body.total).toBe(2)
    for (const f of res.body.items) expect(f).toMatchObject({ assetLabel: 'T1', siteName: 'North N1', surveyId, band: 1 })
    const band4 = await owner.get(`/api/orgs/${slug}/findings?band=4`)
    expect(band4.body.total).toBe(0)
  })
})
