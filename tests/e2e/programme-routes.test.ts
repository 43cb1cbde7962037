import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase } from '../support/db'
import { insertSites, orgIdOf } from '../support/programme-fixtures'

// One degree of a great circle: R·π/180 with the IUGG mean radius R = 6371.0088 km (analytic, Python 3).
const DEGREE_KM = 111.1950802335329

let owner: ApiClient
let slug: string
let orgId: string
let sites: Record<string, string>
const people: Record<string, { client: ApiClient; id: string }> = {}

async function join(role: string, email: string) {
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  const res = await c.post('/api/account/sign-up', { name: `Route ${role}`, email, password: 'route password', invitationToken: token })
  await c.signIn(email, 'route password')
  people[role] = { client: c, id: res.body.user.id }
}

const base = { baseName: 'Equator depot', baseLatitude: 0, baseLongitude: 0 }

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Cy Router', 'cy@routes.test', 'Cy Power'))
  orgId = await orgIdOf(slug)
  // Sites along the equator east of the base, one without coordinates, one archived.
  sites = await insertSites(orgId, [
    { code: 'E1', name: 'East one', lat: 0, lon: 1 },
    { code: 'E2', name: 'East two', lat: 0, lon: 2 },
    { code: 'E3', name: 'East three', lat: 0, lon: 3 },
    { code: 'NC', name: 'No coordinates', lat: null, lon: null },
  ])
  for (const [role, email] of [['thermographer', 'tom@routes.test'], ['crew', 'cal@routes.test'], ['viewer', 'val@routes.test']] as const) await join(role, email)
})

describe('routes', () => {
  let routeId: string
  let version: number

  it('creates a route with stops in the order given and estimates the loop from the base', async () => {
    const res = await owner.post(`/api/orgs/${slug}/routes`, {
      name: 'Equator run', ...base, recurrenceMonths: 12, thermographerId: people.thermographer!.id, siteIds: [sites.E3, sites.E1, sites.E2],
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    routeId = res.body.id
    version = res.body.version
    expect(res.body.stops.map((s: { code: string }) => s.code)).toEqual(['E3', 'E1', 'E2'])
    expect(res.body.thermographer).toMatchObject({ id: people.thermographer!.id, name: 'Route thermographer', isThermographer: true })
    // 0 → 3 → 1 → 2 → 0 degrees along the equator: 3 + 2 + 1 + 2 = 8 degrees of arc.
    expect(res.body.estimate.straightKm).toBeCloseTo(8 * DEGREE_KM, 3)
    // Defaults: road factor 1.3 and 60 km/h (common practice for rural utility driving).
    expect(res.body.estimate.roadKm).toBeCloseTo(8 * DEGREE_KM * 1.3, 3)
    expect(res.body.estimate.hours).toBeCloseTo((8 * DEGREE_KM * 1.3) / 60, 6)
    expect(res.body.travel).toEqual({ roadFactor: 1.3, averageSpeedKmh: 60 })
  })

  it('orders the stops for the shortest trip with the tour planner', async () => {
    const res = await owner.post(`/api/orgs/${slug}/routes/${routeId}/order`, { version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const codes = res.body.stops.map((s: { code: string }) => s.code)
    // Out along the line and back: either direction is the optimum.
    expect([['E1', 'E2', 'E3'], ['E3', 'E2', 'E1']]).toContainEqual(codes)
    expect(res.body.estimate.straightKm).toBeCloseTo(6 * DEGREE_KM, 3)
    expect(res.body.version).toBe(version + 1)
    // The order is stored, not only answered.
    expect((await owner.get(`/api/orgs/${slug}/routes/${routeId}`)).body.stops.map((s: { code: string }) => s.code)).toEqual(codes)
    expect((await owner.post(`/api/orgs/${slug}/routes/${routeId}/order`, { version })).status).toBe(409)
    version = res.body.version
  })

  it('takes a hand-made order and keeps stops without coordinates out of the estimate', async () => {
    const res = await owner.patch(`/api/orgs/${slug}/routes/${routeId}`, { siteIds: [sites.E2, sites.NC, sites.E1, sites.E3], version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.stops.map((s: { code: string }) => s.code)).toEqual(['E2', 'NC', 'E1', 'E3'])
    // 0 → 2 → 1 → 3 → 0: 2 + 1 + 2 + 3 = 8 degrees; the site without coordinates is left out and counted.
    expect(res.body.estimate.straightKm).toBeCloseTo(8 * DEGREE_KM, 3)
    expect(res.body.estimate.missing).toBe(1)
    version = res.body.version
    const ordered = await owner.post(`/api/orgs/${slug}/routes/${routeId}/order`, { version })
    expect(ordered.body.stops.at(-1).code).toBe('NC')
    version = ordered.body.version
  })

  it('uses the organisation’s road factor and average speed', async () => {
    const org = await owner.get(`/api/orgs/${slug}`)
    expect(org.body.programme).toMatchObject({ roadFactor: 1.3, averageSpeedKmh: 60 })
    const bad = await owner.patch(`/api/orgs/${slug}`, { roadFactor: 0.8, averageSpeedKmh: 0, version: org.body.version })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['averageSpeedKmh', 'roadFactor'])
    expect((await owner.patch(`/api/orgs/${slug}`, { roadFactor: 1.5, averageSpeedKmh: 50, version: org.body.version })).status).toBe(200)
    const res = await owner.get(`/api/orgs/${slug}/routes/${routeId}`)
    expect(res.body.estimate.roadKm).toBeCloseTo(6 * DEGREE_KM * 1.5, 3)
    expect(res.body.estimate.hours).toBeCloseTo((6 * DEGREE_KM * 1.5) / 50, 6)
  })

  it('checks the assignment and the stops against this organisation', async () => {
    const crew = await owner.patch(`/api/orgs/${slug}/routes/${routeId}`, { thermographerId: people.crew!.id, version })
    expect(crew.status).toBe(400)
    expect(crew.body.data.fieldErrors.thermographerId[0]).toMatch(/thermographer/)
    const { client: other, slug: otherSlug } = await signUpOwner('Di Other', 'di@routes.test', 'Di Other Grid')
    const foreign = await insertSites(await orgIdOf(otherSlug), [{ code: 'F1', name: 'Foreign', lat: 1, lon: 1 }])
    const res = await owner.patch(`/api/orgs/${slug}/routes/${routeId}`, { siteIds: [sites.E1, foreign.F1], version })
    expect(res.status).toBe(400)
    expect(res.body.data.fieldErrors.siteIds).toBeDefined()
    expect((await other.get(`/api/orgs/${otherSlug}/routes/${routeId}`)).status).toBe(404)
    const dup = await owner.post(`/api/orgs/${slug}/routes`, { name: 'Twice', ...base, recurrenceMonths: 0, siteIds: [sites.E1, sites.E1] })
    expect(dup.status).toBe(400)
    expect(Object.keys(dup.body.data.fieldErrors).sort()).toEqual(['recurrenceMonths', 'siteIds'])
    // Nothing changed meanwhile.
    expect((await owner.get(`/api/orgs/${slug}/routes/${routeId}`)).body.version).toBe(version)
  })

  it('lists, searches, sorts and paginates routes on the server', async () => {
    await owner.post(`/api/orgs/${slug}/routes`, { name: 'Alpha loop', ...base, recurrenceMonths: 6, siteIds: [sites.E1] })
    await owner.post(`/api/orgs/${slug}/routes`, { name: 'Beta loop', baseName: 'North yard', baseLatitude: 1, baseLongitude: 1, recurrenceMonths: 24 })
    const page1 = await owner.get(`/api/orgs/${slug}/routes?pageSize=2`)
    expect(page1.body.total).toBe(3)
    expect(page1.body.items.map((r: { name: string }) => r.name)).toEqual(['Alpha loop', 'Beta loop'])
    expect((await owner.get(`/api/orgs/${slug}/routes?pageSize=2&page=2`)).body.items.map((r: { name: string }) => r.name)).toEqual(['Equator run'])
    expect((await owner.get(`/api/orgs/${slug}/routes?sort=stops`)).body.items.map((r: { stopCount: number }) => r.stopCount)).toEqual([4, 1, 0])
    expect((await owner.get(`/api/orgs/${slug}/routes?q=north`)).body.items.map((r: { name: string }) => r.name)).toEqual(['Beta loop'])
  })

  it('archives and restores a route; other roles read but do not change it', async () => {
    const viewer = people.viewer!.client
    expect((await viewer.get(`/api/orgs/${slug}/routes/${routeId}`)).status).toBe(200)
    expect((await viewer.patch(`/api/orgs/${slug}/routes/${routeId}`, { name: 'Nope', version })).status).toBe(403)
    expect((await people.thermographer!.client.post(`/api/orgs/${slug}/routes/${routeId}/order`, { version })).status).toBe(403)
    const archived = await owner.post(`/api/orgs/${slug}/routes/${routeId}/archive`, { version })
    expect(archived.body.archivedAt).not.toBeNull()
    expect((await owner.get(`/api/orgs/${slug}/routes`)).body.items.map((r: { id: string }) => r.id)).not.toContain(routeId)
    expect((await owner.get(`/api/orgs/${slug}/routes?status=archived`)).body.items.map((r: { id: string }) => r.id)).toEqual([routeId])
    const restored = await owner.post(`/api/orgs/${slug}/routes/${routeId}/restore`, { version: archived.body.version })
    expect(restored.body.archivedAt).toBeNull()
  })
})
