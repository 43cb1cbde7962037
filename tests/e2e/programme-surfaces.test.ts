import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { SURFACES } from '../../shared/thermal/surfaces'
import { DEMO_ORG, seedDemo } from '../../db/seeds/demo'

let owner: ApiClient
let slug: string

async function join(role: string, email: string): Promise<ApiClient> {
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  await c.post('/api/account/sign-up', { name: `Surf ${role}`, email, password: 'surface password', invitationToken: token })
  await c.signIn(email, 'surface password')
  return c
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Bo Surface', 'bo@surfaces.test', 'Bo Lines'))
})

describe('surface library', () => {
  it('starts every new organisation with the reference values, each with its source', async () => {
    const res = await owner.get(`/api/orgs/${slug}/surfaces?pageSize=100`)
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(SURFACES.length)
    for (const s of res.body.items) expect(s.source.length).toBeGreaterThan(3)
    const byName = Object.fromEntries(res.body.items.map((s: { name: string }) => [s.name, s]))
    // Reference sheet §4 [V]: Ede, An Introduction to Heat Transfer (1967), polished aluminium 0.04–0.06.
    expect(byName['Aluminium, polished']).toMatchObject({ emissivity: 0.05, range: [0.04, 0.06], provenance: 'published' })
    expect(byName['Aluminium, polished'].source).toMatch(/Ede/)
    // Reference sheet §4 [CP]: black vinyl tape ≈ 0.95 in LWIR, the usual ASTM E1933 reference emitter.
    expect(byName['Black vinyl electrical tape (LWIR)']).toMatchObject({ emissivity: 0.95, provenance: 'common practice', range: null })
    // Reference sheet §4 [M]: glazed porcelain ≈ 0.92 from the Hottel table, unverified.
    expect(byName['Porcelain, glazed']).toMatchObject({ emissivity: 0.92, provenance: 'from memory' })

    const second = await owner.post('/api/orgs', { name: 'Bo Contracting' })
    expect(second.status).toBe(201)
    expect((await owner.get(`/api/orgs/${second.body.slug}/surfaces`)).body.total).toBe(SURFACES.length)
  })

  it('adds a measured value with its ASTM E1933 method, and refuses one without', async () => {
    const missing = await owner.post(`/api/orgs/${slug}/surfaces`, { name: 'Bus clamp', emissivity: 1.2 })
    expect(missing.status).toBe(400)
    expect(Object.keys(missing.body.data.fieldErrors).sort()).toEqual(['emissivity', 'method'])
    const res = await owner.post(`/api/orgs/${slug}/surfaces`, {
      name: 'Bus clamp, weathered tin', emissivity: 0.38, method: 'contact_thermometer', measuredOn: '2026-06-14', notes: 'Bay 2',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ provenance: 'measured', method: 'contact_thermometer', measuredOn: '2026-06-14', emissivity: 0.38, createdBy: 'Bo Surface' })
    expect(res.body.source).toMatch(/Bo Surface.*ASTM E1933.*contact thermometer/)
    const measured = await owner.get(`/api/orgs/${slug}/surfaces?kind=measured`)
    expect(measured.body.items.map((s: { id: string }) => s.id)).toEqual([res.body.id])
    const reference = await owner.get(`/api/orgs/${slug}/surfaces?kind=reference&pageSize=100`)
    expect(reference.body.total).toBe(SURFACES.length)
  })

  it('edits and archives measured values only; reference values stay as published', async () => {
    const mine = (await owner.get(`/api/orgs/${slug}/surfaces?kind=measured`)).body.items[0]
    const edited = await owner.patch(`/api/orgs/${slug}/surfaces/${mine.id}`, { emissivity: 0.41, method: 'reference_emitter', version: mine.version })
    expect(edited.status).toBe(200)
    expect(edited.body).toMatchObject({ emissivity: 0.41, method: 'reference_emitter', version: mine.version + 1 })
    expect(edited.body.source).toMatch(/reference emitter/)
    expect((await owner.patch(`/api/orgs/${slug}/surfaces/${mine.id}`, { notes: 'x', version: mine.version })).status).toBe(409)

    const glass = (await owner.get(`/api/orgs/${slug}/surfaces?q=glass`)).body.items[0]
    const refused = await owner.patch(`/api/orgs/${slug}/surfaces/${glass.id}`, { emissivity: 0.5, version: glass.version })
    expect(refused.status).toBe(409)
    expect(refused.body.data.message).toMatch(/measured value/)
    expect((await owner.post(`/api/orgs/${slug}/surfaces/${glass.id}/archive`, { version: glass.version })).status).toBe(409)

    const archived = await owner.post(`/api/orgs/${slug}/surfaces/${mine.id}/archive`, { version: edited.body.version })
    expect(archived.status).toBe(200)
    expect((await owner.get(`/api/orgs/${slug}/surfaces?kind=measured`)).body.total).toBe(0)
  })

  it('sorts and searches on the server', async () => {
    const byE = await owner.get(`/api/orgs/${slug}/surfaces?sort=emissivity&pageSize=3`)
    const values = byE.body.items.map((s: { emissivity: number }) => s.emissivity)
    expect(values).toEqual([...values].sort((a, b) => b - a))
    expect(values[0]).toBe(Math.max(...SURFACES.map((s) => s.emissivity)))
    expect((await owner.get(`/api/orgs/${slug}/surfaces?q=copper`)).body.items.map((s: { name: string }) => s.name).sort())
      .toEqual(SURFACES.filter((s) => /copper/i.test(s.name)).map((s) => s.name).sort())
  })

  it('lets managers add values and keeps thermographers to reading', async () => {
    const manager = await join('manager', 'mo@surfaces.test')
    const thermographer = await join('thermographer', 'tia@surfaces.test')
    expect((await manager.post(`/api/orgs/${slug}/surfaces`, { name: 'Painted tank', emissivity: 0.9, method: 'reference_emitter' })).status).toBe(201)
    expect((await thermographer.get(`/api/orgs/${slug}/surfaces`)).status).toBe(200)
    expect((await thermographer.post(`/api/orgs/${slug}/surfaces`, { name: 'Nope', emissivity: 0.9, method: 'reference_emitter' })).status).toBe(403)
  })

  it('seeds the demo organisation’s library, instruments and route', async () => {
    await seedDemo(testDb() as never)
    const org = await testDb().selectFrom('organisations').select('id').where('slug', '=', DEMO_ORG.slug).executeTakeFirstOrThrow()
    const count = async (table: 'surfaces' | 'instruments' | 'routes') =>
      Number((await testDb().selectFrom(table).select((eb) => eb.fn.countAll().as('n')).where('organisation_id', '=', org.id).executeTakeFirstOrThrow()).n)
    expect(await count('surfaces')).toBe(SURFACES.length + 1)
    expect(await count('instruments')).toBe(2)
    expect(await count('routes')).toBe(1)
    const demo = new ApiClient()
    await demo.signIn('manager@lowmoor.example', 'greybody-demo-2026')
    const instruments = await demo.get(`/api/orgs/${DEMO_ORG.slug}/instruments?sort=calibration`)
    expect(instruments.body.items[0].calibrationStatus).toBe('overdue')
    const routes = await demo.get(`/api/orgs/${DEMO_ORG.slug}/routes`)
    expect(routes.body.items[0]).toMatchObject({ stopCount: 6, thermographer: { isThermographer: true } })
  })
})
