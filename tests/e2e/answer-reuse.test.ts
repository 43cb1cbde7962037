// Reused answers (server/utils/org-cache.ts) and the keys a finding carries for the list (migration 20261205_0100):
// a reused findings list or dashboard is never older than the last committed change, whoever made it (the API, another
// app instance, a script straight to PostgreSQL); organisations.change_seq moves once per committed transaction and
// not for a rolled-back one; and the copies of a finding's survey state, site and band follow their sources.
import { sql } from 'kysely'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'

let owner: ApiClient
let slug: string
let orgId: string
let userId: string
let other: { client: ApiClient; slug: string; orgId: string }
let surveyId: string
let surveyVersion: number
let site2: string
let t1: string
const findingIds: string[] = []

const list = (query = '', headers: Record<string, string> = {}) => owner.request('GET', `/api/orgs/${slug}/findings${query}`, undefined, false, headers)
const answer = (res: { headers: Headers }) => res.headers.get('x-greybody-answer')
const changeSeq = async (id: string) => Number((await testDb().selectFrom('organisations').select('change_seq').where('id', '=', id).executeTakeFirstOrThrow()).change_seq)

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug, userId } = await signUpOwner('Ines Reuse', 'ines@reuse.test', 'Reuse Power'))
  const o = await signUpOwner('Otto Other', 'otto@reuse.test', 'Other Grid')
  const db = testDb()
  orgId = (await db.selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  other = { client: o.client, slug: o.slug, orgId: (await db.selectFrom('organisations').select('id').where('slug', '=', o.slug).executeTakeFirstOrThrow()).id }
  const site1 = (await owner.post(`/api/orgs/${slug}/sites`, { code: 'R1', name: 'Reuse yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })).body.id
  site2 = (await owner.post(`/api/orgs/${slug}/sites`, { code: 'R2', name: 'Second yard', kind: 'substation', latitude: 54.2, longitude: -2.8 })).body.id
  t1 = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: site1, label: 'T1', assetClass: 'transformer' })).body.id
  const t2 = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: site1, label: 'T2', assetClass: 'transformer' })).body.id
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'R-100', bandFromUm: 8, bandToUm: 14 })
  const plan = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-06-30', thermographerId: userId, instrumentId: inst.body.id, siteIds: [site1] })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  surveyId = plan.body.id
  const url = (p: string) => `/api/orgs/${slug}/surveys/${surveyId}${p}`
  expect((await owner.post(url('/start'), { version: plan.body.version })).status).toBeLessThan(300)
  const base = { emissivity: 0.9, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 3, probableCause: 'loose_connection' }
  // Over reference 30 K: band 1; over ambient 25 K only: band 2 (ANSI/NETA Table 100.18 as the engine applies it).
  for (const [assetId, reading] of [[t1, { apparentC: 60, referenceC: 30, ambientC: 20 }], [t2, { apparentC: 45, ambientC: 20 }]] as const) {
    expect((await owner.post(url('/checks'), { assetId, outcome: 'finding' })).status).toBeLessThan(300)
    const f = await owner.post(url('/findings'), { ...base, ...reading, assetId, component: assetId === t1 ? 'Clamp T1' : 'Clamp T2' })
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    findingIds.push(f.body.id)
  }
  surveyVersion = (await owner.get(url(''))).body.version
}, 120_000)

describe('the keys a finding carries for the list', () => {
  it('are copied from its check, asset and survey when it is recorded', async () => {
    const rows = await testDb().selectFrom('findings').select(['id', 'survey_id', 'asset_id', 'site_id', 'survey_state', 'survey_planned_for', 'survey_archived', 'effective_band', 'band'])
      .where('organisation_id', '=', orgId).orderBy('created_at').execute()
    expect(rows).toHaveLength(2)
    for (const r of rows) {
      expect(r).toMatchObject({ survey_id: surveyId, survey_state: 'in_progress', survey_archived: false })
      expect(r.effective_band).toBe(r.band)
    }
    expect(rows.map((r) => r.effective_band)).toEqual([1, 2])
  })

  it('follow the survey through submission, a corrected band, and the asset moving to another site', async () => {
    const before = await list('?open=true')
    expect(before.body.total).toBe(0) // open means submitted or reviewed
    const submitted = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: surveyVersion })
    expect(submitted.status, JSON.stringify(submitted.body)).toBeLessThan(300)
    const open = await list('?open=true')
    expect(answer(open)).toBe('computed')
    expect(open.body.items.map((f: { id: string }) => f.id)).toEqual(findingIds)

    // A manager's corrected band moves the finding between the band filters (effective_band is generated).
    const f2 = (await owner.get(`/api/orgs/${slug}/findings/${findingIds[1]}`)).body
    const ranked = await owner.post(`/api/orgs/${slug}/findings/${findingIds[1]}/rank`, { band: 1, reason: 'Load was low at the time; repair first.', version: f2.version })
    expect(ranked.status, JSON.stringify(ranked.body)).toBeLessThan(300)
    expect((await list('?band=1')).body.items.map((f: { id: string }) => f.id)).toEqual(findingIds)
    expect((await list('?band=2')).body.total).toBe(0)

    // The asset moves to the second site: its findings are listed there, and the site name follows.
    const asset = (await owner.get(`/api/orgs/${slug}/assets/${t1}`)).body
    const moved = await owner.patch(`/api/orgs/${slug}/assets/${t1}`, { siteId: site2, version: asset.version })
    expect(moved.status, JSON.stringify(moved.body)).toBe(200)
    const atSite2 = await list(`?siteId=${site2}`)
    expect(atSite2.body.items.map((f: { id: string; siteName: string }) => [f.id, f.siteName])).toEqual([[findingIds[0], 'Second yard']])
  })

  it('cannot be written by anyone but the triggers', async () => {
    // An update naming a copied column is answered with the true value again.
    await sql`update findings set survey_state = 'planned', site_id = ${other.orgId} where id = ${findingIds[0]}`.execute(testDb())
    const row = await testDb().selectFrom('findings').select(['survey_state', 'site_id']).where('id', '=', findingIds[0]!).executeTakeFirstOrThrow()
    expect(row).toEqual({ survey_state: 'submitted', site_id: site2 })
  })
})

describe('reused answers', () => {
  it('reuse the same page until the organisation changes, and say so', async () => {
    const first = await list('?pageSize=10')
    const again = await list('?pageSize=10')
    expect(answer(first)).toMatch(/computed|reused/)
    expect(answer(again)).toBe('reused')
    expect(again.body).toEqual(first.body)
    expect(again.headers.get('content-type')).toMatch(/^application\/json/)
    // Cache-Control: no-cache computes it afresh.
    const fresh = await list('?pageSize=10', { 'cache-control': 'no-cache' })
    expect(answer(fresh)).toBe('fresh')
    expect(fresh.body).toEqual(first.body)
  })

  it('show a change made straight in PostgreSQL at the very next request (another instance, a script)', async () => {
    expect(answer(await list('?pageSize=10'))).toBe('reused')
    await testDb().updateTable('findings').set({ notes: 'Written by another instance.' }).where('id', '=', findingIds[1]!).execute()
    const next = await list('?pageSize=10')
    expect(answer(next)).toBe('computed')
    expect(next.body.items.find((f: { id: string }) => f.id === findingIds[1]).notes).toBe('Written by another instance.')
  })

  it('give every request that arrives together after a change the new page', async () => {
    expect(answer(await list('?pageSize=10'))).toBe('reused')
    await testDb().updateTable('findings').set({ notes: 'Seen by all at once.' }).where('id', '=', findingIds[0]!).execute()
    const together = await Promise.all(Array.from({ length: 8 }, () => list('?pageSize=10')))
    expect(together.some((res) => answer(res) === 'computed')).toBe(true)
    for (const res of together) {
      expect(res.status).toBe(200)
      // Computed (once, shared by those waiting for it) or, for one that arrived after, reused: never the old page.
      expect(answer(res)).toMatch(/^(computed|reused)$/)
      expect(res.body.items.find((f: { id: string }) => f.id === findingIds[0]).notes).toBe('Seen by all at once.')
    }
    expect(answer(await list('?pageSize=10'))).toBe('reused')
  })

  it('show a reviewer’s new name', async () => {
    expect(answer(await list('?pageSize=10'))).toBe('reused')
    await testDb().updateTable('users').set({ name: 'Ines Renamed' }).where('id', '=', userId).execute()
    const next = await list('?pageSize=10')
    expect(next.body.items.find((f: { id: string }) => f.id === findingIds[1]).review.by.name).toBe('Ines Renamed')
  })

  it('count a committed transaction once, per organisation it touched, and a rolled-back one not at all', async () => {
    const db = testDb()
    const [a0, b0] = [await changeSeq(orgId), await changeSeq(other.orgId)]
    await db.transaction().execute(async (trx) => {
      for (const id of findingIds) await trx.updateTable('findings').set({ notes: 'Twice in one go.' }).where('id', '=', id).execute()
      await trx.updateTable('sites').set({ name: 'Reuse yard (renamed)' }).where('organisation_id', '=', orgId).where('code', '=', 'R1').execute()
    })
    expect(await changeSeq(orgId)).toBe(a0 + 1)
    expect(await changeSeq(other.orgId)).toBe(b0)
    await expect(db.transaction().execute(async (trx) => {
      await trx.updateTable('findings').set({ notes: 'Never kept.' }).where('id', '=', findingIds[0]!).execute()
      throw new Error('roll back')
    })).rejects.toThrow('roll back')
    expect(await changeSeq(orgId)).toBe(a0 + 1)
    // The organisation's own settings count as a change too.
    await db.updateTable('organisations').set({ time_zone: 'Europe/Oslo' }).where('id', '=', orgId).execute()
    expect(await changeSeq(orgId)).toBe(a0 + 2)
  })

  it('are never given to another organisation', async () => {
    const mine = await list('?pageSize=10')
    expect(mine.body.total).toBe(2)
    expect((await other.client.get(`/api/orgs/${slug}/findings?pageSize=10`)).status).toBe(404)
    const theirs = await other.client.get(`/api/orgs/${other.slug}/findings?pageSize=10`)
    expect(theirs.status).toBe(200)
    expect(theirs.body.total).toBe(0)
    expect(answer(theirs)).toBe('computed')
  })

  it('keep the dashboard until a finding changes', async () => {
    const first = await owner.get(`/api/orgs/${slug}/dashboard`)
    expect(first.status).toBe(200)
    expect(answer(await owner.get(`/api/orgs/${slug}/dashboard`))).toBe('reused')
    const f = (await owner.get(`/api/orgs/${slug}/findings/${findingIds[0]}`)).body
    expect((await owner.post(`/api/orgs/${slug}/findings/${findingIds[0]}/rank`, { band: 3, reason: 'Reassessed on the second visit.', version: f.version })).status).toBeLessThan(300)
    const after = await owner.get(`/api/orgs/${slug}/dashboard`)
    expect(answer(after)).toBe('computed')
  })
})
