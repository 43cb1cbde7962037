import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase } from '../support/db'
import { insertSites, orgIdOf } from '../support/programme-fixtures'
import { addDays, todayIn } from '../../shared/schedule'

let owner: ApiClient
let slug: string
let viewer: ApiClient

async function join(role: string, email: string): Promise<ApiClient> {
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  await c.post('/api/account/sign-up', { name: `A ${role}`, email, password: 'instrument password', invitationToken: token })
  await c.signIn(email, 'instrument password')
  return c
}

const imager = (over: Record<string, unknown> = {}) => ({
  make: 'Halden Optics', model: 'TX-640', serial: 'S-1', bandFromUm: 7.5, bandToUm: 14, ifovMrad: 0.68, accuracyK: 2, accuracyPct: 2,
  calibrationDue: '2099-12-31', ...over,
})

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Ada Imager', 'ada@instruments.test', 'Ada Grid'))
  viewer = await join('viewer', 'vic@instruments.test')
})

describe('instruments', () => {
  it('registers an imager with its band, optics, accuracy and calibration date', async () => {
    const res = await owner.post(`/api/orgs/${slug}/instruments`, imager())
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({
      make: 'Halden Optics', model: 'TX-640', serial: 'S-1', bandFromUm: 7.5, bandToUm: 14, bandLabel: 'LWIR 7.5–14 µm',
      ifovMrad: 0.68, accuracyK: 2, accuracyPct: 2, calibrationDue: '2099-12-31', calibrationStatus: 'in date', archivedAt: null, version: 1,
    })
    const custom = await owner.post(`/api/orgs/${slug}/instruments`, imager({ serial: 'S-2', bandFromUm: 8, bandToUm: 12, ifovMrad: null, calibrationDue: null }))
    expect(custom.body).toMatchObject({ bandLabel: '8–12 µm', ifovMrad: null, calibrationStatus: 'unknown' })
  })

  it('flags a calibration date in the past, and one due within 30 days, on the organisation’s date', async () => {
    const today = todayIn('UTC') // a new organisation's time zone is UTC
    const past = await owner.post(`/api/orgs/${slug}/instruments`, imager({ serial: 'OLD-1', calibrationDue: addDays(today, -1) }))
    expect(past.body.calibrationStatus).toBe('overdue')
    const soon = await owner.post(`/api/orgs/${slug}/instruments`, imager({ serial: 'SOON-1', calibrationDue: addDays(today, 10) }))
    expect(soon.body.calibrationStatus).toBe('due soon')
    const list = await owner.get(`/api/orgs/${slug}/instruments?sort=calibration`)
    // Earliest calibration date first, no date last.
    expect(list.body.items.map((i: { serial: string }) => i.serial)).toEqual(['OLD-1', 'SOON-1', 'S-1', 'S-2'])
    expect(list.body.items[0].calibrationStatus).toBe('overdue')
  })

  it('shows the flag where the instrument is chosen: on a route', async () => {
    const orgId = await orgIdOf(slug)
    const sites = await insertSites(orgId, [{ code: 'A', name: 'Alder', lat: 52.4, lon: -1.9 }])
    const old = (await owner.get(`/api/orgs/${slug}/instruments?q=OLD`)).body.items[0]
    const route = await owner.post(`/api/orgs/${slug}/routes`, { name: 'Check run', baseName: 'Depot', baseLatitude: 52.3, baseLongitude: -1.8, recurrenceMonths: 12, instrumentId: old.id, siteIds: [sites.A] })
    expect(route.status, JSON.stringify(route.body)).toBe(201)
    expect(route.body.instrument).toMatchObject({ id: old.id, calibrationStatus: 'overdue', calibrationDue: old.calibrationDue })
    const list = await viewer.get(`/api/orgs/${slug}/routes`)
    expect(list.body.items[0].instrument.calibrationStatus).toBe('overdue')
  })

  it('explains bad input field by field', async () => {
    const res = await owner.post(`/api/orgs/${slug}/instruments`, { make: '', model: 'M', serial: 'X', bandFromUm: 14, bandToUm: 8, accuracyK: -1, calibrationDue: '31/12/2099' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fieldErrors).sort()).toEqual(['accuracyK', 'bandToUm', 'calibrationDue', 'make'])
    const dup = await owner.post(`/api/orgs/${slug}/instruments`, imager({ make: 'halden optics', serial: 's-1' }))
    expect(dup.status).toBe(409)
    expect(dup.body.data.fieldErrors.serial[0]).toMatch(/already has this serial/)
  })

  it('searches and paginates on the server', async () => {
    const page1 = await owner.get(`/api/orgs/${slug}/instruments?pageSize=3&page=1`)
    const page2 = await owner.get(`/api/orgs/${slug}/instruments?pageSize=3&page=2`)
    expect(page1.body.total).toBe(4)
    expect(page1.body.items).toHaveLength(3)
    expect(page2.body.items).toHaveLength(1)
    expect(new Set([...page1.body.items, ...page2.body.items].map((i: { id: string }) => i.id)).size).toBe(4)
    expect((await owner.get(`/api/orgs/${slug}/instruments?q=soon`)).body.items.map((i: { serial: string }) => i.serial)).toEqual(['SOON-1'])
    expect((await owner.get(`/api/orgs/${slug}/instruments?pageSize=500`)).status).toBe(400)
  })

  it('edits with optimistic locking and archives instead of deleting', async () => {
    const s2 = (await owner.get(`/api/orgs/${slug}/instruments?q=S-2`)).body.items[0]
    const edited = await owner.patch(`/api/orgs/${slug}/instruments/${s2.id}`, { calibrationDue: '2030-06-30', version: s2.version })
    expect(edited.status).toBe(200)
    expect(edited.body).toMatchObject({ calibrationDue: '2030-06-30', version: s2.version + 1 })
    const stale = await owner.patch(`/api/orgs/${slug}/instruments/${s2.id}`, { notes: 'late', version: s2.version })
    expect(stale.status).toBe(409)
    const half = await owner.patch(`/api/orgs/${slug}/instruments/${s2.id}`, { bandFromUm: 3, version: edited.body.version })
    expect(half.status).toBe(400)
    expect(half.body.data.fieldErrors.bandToUm).toBeDefined()

    const archived = await owner.post(`/api/orgs/${slug}/instruments/${s2.id}/archive`, { version: edited.body.version })
    expect(archived.body.archivedAt).not.toBeNull()
    expect((await owner.get(`/api/orgs/${slug}/instruments`)).body.items.map((i: { id: string }) => i.id)).not.toContain(s2.id)
    expect((await owner.get(`/api/orgs/${slug}/instruments?status=archived`)).body.items.map((i: { id: string }) => i.id)).toEqual([s2.id])
    expect((await owner.get(`/api/orgs/${slug}/instruments/${s2.id}`)).status).toBe(200)
    // An archived imager cannot be chosen for a route.
    const route = await owner.post(`/api/orgs/${slug}/routes`, { name: 'Archived imager', baseName: 'Depot', baseLatitude: 1, baseLongitude: 1, recurrenceMonths: 6, instrumentId: s2.id })
    expect(route.status).toBe(400)
    expect(route.body.data.fieldErrors.instrumentId).toBeDefined()
    const restored = await owner.post(`/api/orgs/${slug}/instruments/${s2.id}/restore`, { version: archived.body.version })
    expect(restored.body.archivedAt).toBeNull()
  })

  it('keeps an archived imager on a route that already names it, flagged as archived', async () => {
    const old = (await owner.get(`/api/orgs/${slug}/instruments?q=OLD`)).body.items[0]
    const route = (await owner.get(`/api/orgs/${slug}/routes`)).body.items[0]
    await owner.post(`/api/orgs/${slug}/instruments/${old.id}/archive`, { version: old.version })
    const kept = await owner.patch(`/api/orgs/${slug}/routes/${route.id}`, { name: 'Check run, renamed', instrumentId: old.id, version: route.version })
    expect(kept.status, JSON.stringify(kept.body)).toBe(200)
    expect(kept.body.instrument).toMatchObject({ id: old.id, archived: true, calibrationStatus: 'overdue' })
    // Choosing it anew is refused.
    const other = await owner.post(`/api/orgs/${slug}/routes`, { name: 'New run', baseName: 'Depot', baseLatitude: 1, baseLongitude: 1, recurrenceMonths: 6, instrumentId: old.id })
    expect(other.status).toBe(400)
  })

  it('lets every role read and only owners and managers change', async () => {
    expect((await viewer.get(`/api/orgs/${slug}/instruments`)).status).toBe(200)
    const res = await viewer.post(`/api/orgs/${slug}/instruments`, imager({ serial: 'V-1' }))
    expect(res.status).toBe(403)
  })
})
