import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { createAsset, createSite, siteBody } from '../support/register'

let owner: ApiClient
let slug: string
let manager: ApiClient
let viewer: ApiClient

async function member(role: string, email: string) {
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  await c.post('/api/account/sign-up', { name: `A ${role}`, email, password: 'register password', invitationToken: token })
  await c.signIn(email, 'register password')
  return c
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Ada Lind', 'ada@sites.test', 'Fellside Power'))
  manager = await member('manager', 'mo@sites.test')
  viewer = await member('viewer', 'vi@sites.test')
})

describe('sites', () => {
  it('a manager creates, reads, edits, archives and restores a site', async () => {
    const created = await manager.post(`/api/orgs/${slug}/sites`, siteBody({
      code: 'FEL-01', name: 'Fellside Grid', kind: 'switchyard', accessNotes: 'Key safe at gate', safetyNotes: 'Call control first',
      safetyFlags: ['permit_required', 'ir_windows'],
    }))
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({
      code: 'FEL-01', name: 'Fellside Grid', kind: 'switchyard', latitude: 54.3712, longitude: -2.9081, voltageKv: 132,
      accessNotes: 'Key safe at gate', safetyNotes: 'Call control first', safetyFlags: ['permit_required', 'ir_windows'],
      assetCount: 0, archivedAt: null, version: 1,
    })
    const id = created.body.id
    const read = await viewer.get(`/api/orgs/${slug}/sites/${id}`)
    expect(read.status).toBe(200)
    expect(read.body.name).toBe('Fellside Grid')

    const edited = await manager.patch(`/api/orgs/${slug}/sites/${id}`, { name: 'Fellside Grid North', voltageKv: null, version: 1 })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body).toMatchObject({ name: 'Fellside Grid North', voltageKv: null, kind: 'switchyard', version: 2 })

    const archived = await manager.post(`/api/orgs/${slug}/sites/${id}/archive`, { version: 2 })
    expect(archived.status).toBe(200)
    expect(archived.body.archivedAt).not.toBeNull()
    const active = await manager.get(`/api/orgs/${slug}/sites?q=FEL-01`)
    expect(active.body.total).toBe(0)
    const inArchive = await manager.get(`/api/orgs/${slug}/sites?q=FEL-01&show=archived`)
    expect(inArchive.body.items.map((s: { id: string }) => s.id)).toEqual([id])
    // Archived, never deleted: it still reads.
    expect((await manager.get(`/api/orgs/${slug}/sites/${id}`)).status).toBe(200)

    const restored = await manager.post(`/api/orgs/${slug}/sites/${id}/unarchive`, { version: archived.body.version })
    expect(restored.status).toBe(200)
    expect(restored.body.archivedAt).toBeNull()
  })

  it('archiving a site archives its active assets, and restoring brings back exactly those', async () => {
    const site = await createSite(manager, slug, { code: 'FEL-02', name: 'Beckside' })
    const kept = await createAsset(manager, slug, site.id, { label: 'T1' })
    const earlier = await createAsset(manager, slug, site.id, { label: 'T2' })
    const a = await manager.post(`/api/orgs/${slug}/assets/${earlier.id}/archive`, { version: earlier.version })
    expect(a.status).toBe(200)

    const archived = await manager.post(`/api/orgs/${slug}/sites/${site.id}/archive`, { version: site.version })
    expect((await manager.get(`/api/orgs/${slug}/assets/${kept.id}`)).body.archivedAt).not.toBeNull()
    const noNew = await manager.post(`/api/orgs/${slug}/assets`, { siteId: site.id, label: 'T3', assetClass: 'breaker' })
    expect(noNew.status).toBe(400)
    expect(noNew.body.data.fieldErrors.siteId[0]).toMatch(/archived/)

    await manager.post(`/api/orgs/${slug}/sites/${site.id}/unarchive`, { version: archived.body.version })
    expect((await manager.get(`/api/orgs/${slug}/assets/${kept.id}`)).body.archivedAt).toBeNull()
    expect((await manager.get(`/api/orgs/${slug}/assets/${earlier.id}`)).body.archivedAt).not.toBeNull()
    expect((await manager.get(`/api/orgs/${slug}/sites/${site.id}`)).body.assetCount).toBe(1)
  })

  it('answers each wrong field with a plain message at that field', async () => {
    const res = await manager.post(`/api/orgs/${slug}/sites`, { code: 'has space', name: ' ', kind: 'farm', latitude: 95, voltageKv: -1, safetyFlags: ['bring cake'] })
    expect(res.status).toBe(400)
    const f = res.body.data.fieldErrors
    expect(f.code[0]).toMatch(/no spaces/)
    expect(f.name[0]).toBe('Enter the site name.')
    expect(f.kind[0]).toBe('Choose the kind of site.')
    expect(f.latitude[0]).toMatch(/-90 to 90/)
    expect(f.longitude[0]).toMatch(/Enter the longitude/)
    expect(f.voltageKv[0]).toMatch(/above 0 kV/)
    expect(f['safetyFlags.0'][0]).toMatch(/listed safety notes/)
  })

  it('refuses a code already in use (archived sites included) at the code field', async () => {
    await createSite(manager, slug, { code: 'DUP-1' })
    const res = await manager.post(`/api/orgs/${slug}/sites`, siteBody({ code: 'DUP-1', name: 'Another' }))
    expect(res.status).toBe(409)
    expect(res.body.data.fieldErrors.code[0]).toMatch(/already uses the code DUP-1/)
  })

  it('refuses an edit made on a stale version and keeps the first one', async () => {
    const site = await createSite(manager, slug, { code: 'LOCK-1', name: 'Original' })
    const first = await manager.patch(`/api/orgs/${slug}/sites/${site.id}`, { name: 'First edit', version: site.version })
    expect(first.status).toBe(200)
    const second = await owner.patch(`/api/orgs/${slug}/sites/${site.id}`, { name: 'Second edit', version: site.version })
    expect(second.status).toBe(409)
    expect(second.body.data.message).toMatch(/changed this site while you were editing/)
    const stale = await owner.post(`/api/orgs/${slug}/sites/${site.id}/archive`, { version: site.version })
    expect(stale.status).toBe(409)
    const now = await manager.get(`/api/orgs/${slug}/sites/${site.id}`)
    expect(now.body).toMatchObject({ name: 'First edit', version: 2, archivedAt: null })
  })

  it('lets viewers read but not change the register', async () => {
    const site = await createSite(manager, slug, { code: 'RO-1' })
    expect((await viewer.get(`/api/orgs/${slug}/sites/${site.id}`)).status).toBe(200)
    const res = await viewer.patch(`/api/orgs/${slug}/sites/${site.id}`, { name: 'Viewer edit', version: site.version })
    expect(res.status).toBe(403)
  })
})

describe('the site list', () => {
  let org: string
  let client: ApiClient
  beforeAll(async () => {
    ;({ client, slug: org } = await signUpOwner('Lis Tor', 'lis@sites.test', 'List Utility'))
    // 30 sites is past the trial's 25 (tests/e2e/plan-limits.test.ts): this organisation is on the Utility plan.
    await testDb().updateTable('organisation_billing').set({ plan: 'utility' })
      .where('organisation_id', '=', (eb) => eb.selectFrom('organisations').select('id').where('slug', '=', org)).execute()
    const kinds = ['substation', 'switchyard', 'plant_room', 'line_section'] as const
    for (let i = 1; i <= 30; i++) {
      await createSite(client, org, {
        code: `S-${String(i).padStart(2, '0')}`, name: `${i % 3 === 0 ? 'Marsh' : 'Hill'} ${String.fromCharCode(96 + ((i * 7) % 26) + 1)}${i}`,
        kind: kinds[i % 4], voltageKv: i % 5 === 0 ? null : i * 10,
      })
    }
  })

  it('searches, filters, sorts and pages on the server with a total', async () => {
    const all: Array<{ code: string; name: string; kind: string; voltageKv: number | null }> = []
    for (let page = 1; page <= 2; page++) {
      const res = await client.get(`/api/orgs/${org}/sites?pageSize=25&page=${page}`)
      expect(res.status).toBe(200)
      expect(res.body.total).toBe(30)
      all.push(...res.body.items)
    }
    expect(all).toHaveLength(30)
    expect(new Set(all.map((s) => s.code)).size).toBe(30)
    // Default order is by name, case-insensitive, as the database sorts lower(name) (common practice).
    const names = all.map((s) => s.name)
    expect(names).toEqual([...names].sort((a, b) => (a.toLowerCase() < b.toLowerCase() ? -1 : 1)))

    const marsh = await client.get(`/api/orgs/${org}/sites?q=marsh&pageSize=100`)
    expect(marsh.body.total).toBe(10)
    expect(marsh.body.items.every((s: { name: string }) => s.name.startsWith('Marsh'))).toBe(true)

    const byCode = await client.get(`/api/orgs/${org}/sites?q=S-1&pageSize=100`)
    expect(byCode.body.items.map((s: { code: string }) => s.code).sort()).toEqual(['S-10', 'S-11', 'S-12', 'S-13', 'S-14', 'S-15', 'S-16', 'S-17', 'S-18', 'S-19'])

    const plantRooms = await client.get(`/api/orgs/${org}/sites?kind=plant_room&pageSize=100`)
    expect(plantRooms.body.total).toBe(all.filter((s) => s.kind === 'plant_room').length)

    const volts = await client.get(`/api/orgs/${org}/sites?sort=voltage&dir=desc&pageSize=100`)
    const v = volts.body.items.map((s: { voltageKv: number | null }) => s.voltageKv)
    const withValue = v.filter((x: number | null) => x !== null)
    expect(withValue).toEqual([...withValue].sort((a: number, b: number) => b - a))
    // Sites without a voltage come last.
    expect(v.slice(withValue.length).every((x: number | null) => x === null)).toBe(true)

    const late = await client.get(`/api/orgs/${org}/sites?page=9&pageSize=25`)
    expect(late.body).toMatchObject({ items: [], total: 30, page: 9 })

    const bad = await client.get(`/api/orgs/${org}/sites?pageSize=7&sort=colour`)
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['pageSize', 'sort'])
  })
})
