import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { NETA_100_18, rankRise } from '../../shared/thermal/index'

// Offline replays (Idempotency-Key), a manager's band review, editing a saved finding, and an asset's history.

let owner: ApiClient
let ownerId: string
let slug: string
let instrumentId: string
const sites: Record<string, string> = {}
const assets: Record<string, string> = {}
const people: Record<string, { client: ApiClient; id: string }> = {}

async function join(key: string, role: string, email: string) {
  people[key] = await joinByInvitation(owner, slug, email, role, `Field ${key}`, 'field password')
}

const thermo = () => people.thermo!.client
const withKey = (c: ApiClient, path: string, body: unknown, key: string) => c.request('POST', path, body, false, { 'Idempotency-Key': key })

// reference sheet §5 [C]: 8–14 µm, T_app 50 °C, ε 0.50, T_refl 20 °C, τ = 1 → 74.340 °C (rise over 20 °C ambient 54.3 K).
const reading = {
  component: 'Line-side connector', phase: 'L1',
  apparentC: 50, ambientC: 20, emissivity: 0.5, reflectedC: 20, reflectedMethod: 'reflector', distanceM: 3,
  probableCause: 'loose_connection',
}

async function plannedSurvey(siteIds: string[], thermographer = people.thermo!.id) {
  const res = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: thermographer, instrumentId, siteIds })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string; version: number }
}

async function startedSurvey(siteIds: string[]) {
  const s = await plannedSurvey(siteIds)
  const started = await thermo().post(`/api/orgs/${slug}/surveys/${s.id}/start`, { version: s.version })
  expect(started.status).toBe(200)
  return s.id
}

async function count(table: 'findings' | 'checks' | 'idempotency_keys', where: Record<string, string> = {}) {
  let q = testDb().selectFrom(table).select((eb) => eb.fn.countAll<number>().as('n'))
  for (const [k, v] of Object.entries(where)) q = q.where(k as never, '=', v as never)
  return Number((await q.executeTakeFirstOrThrow()).n)
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug, userId: ownerId } = await signUpOwner('Fay Fieldwork', 'fay@field.test', 'Fay Grid'))
  await join('thermo', 'thermographer', 'tam@field.test')
  await join('other', 'thermographer', 'oli@field.test')
  await join('manager', 'manager', 'max@field.test')
  await join('crew', 'crew', 'cy@field.test')
  await join('viewer', 'viewer', 'val@field.test')
  for (const code of ['F1', 'F2', 'F3']) {
    const s = await owner.post(`/api/orgs/${slug}/sites`, { code, name: `Fen ${code}`, kind: 'substation', latitude: 52.2, longitude: 0.1 })
    sites[code] = s.body.id
  }
  for (const [label, site] of [['A1', 'F1'], ['A2', 'F1'], ['B1', 'F2'], ['H1', 'F3']] as const) {
    const a = await owner.post(`/api/orgs/${slug}/assets`, { siteId: sites[site], label, assetClass: 'breaker' })
    assets[label] = a.body.id
  }
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'F-814', bandFromUm: 8, bandToUm: 14 })
  instrumentId = inst.body.id
}, 60_000)

describe('offline replays with an Idempotency-Key', () => {
  let surveyId: string
  beforeAll(async () => { surveyId = await startedSurvey([sites.F1!]) })
  const url = (p: string) => `/api/orgs/${slug}/surveys/${surveyId}/${p}`

  it('saves a finding sent twice with one key once, and answers the replay with the same status and body', async () => {
    const key = randomUUID()
    const first = await withKey(thermo(), url('findings'), { assetId: assets.A1, ...reading }, key)
    expect(first.status, JSON.stringify(first.body)).toBe(201)
    const again = await withKey(thermo(), url('findings'), { ...reading, assetId: assets.A1 }, key) // same body, other key order
    expect(again.status).toBe(201)
    expect(again.body).toEqual(first.body)
    expect(again.headers.get('idempotent-replayed')).toBe('true')
    expect(await count('findings', { check_id: first.body.checkId })).toBe(1)
  })

  it('saves a check and field conditions sent twice once', async () => {
    const key = randomUUID()
    const first = await withKey(thermo(), url('checks'), { assetId: assets.A2, outcome: 'clear' }, key)
    expect(first.status).toBe(200)
    const before = await testDb().selectFrom('checks').select('version').where('asset_id', '=', assets.A2!).executeTakeFirstOrThrow()
    const again = await withKey(thermo(), url('checks'), { assetId: assets.A2, outcome: 'clear' }, key)
    expect(again.status).toBe(200)
    expect(again.body.version).toBe(first.body.version)
    // Not written again: the check's version (bumped on every write) is unchanged.
    const after = await testDb().selectFrom('checks').select('version').where('asset_id', '=', assets.A2!).executeTakeFirstOrThrow()
    expect(after.version).toBe(before.version)
    const ck = randomUUID()
    const c1 = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 12, windMs: 3 }, ck)
    const c2 = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 12, windMs: 3 }, ck)
    expect([c1.status, c2.status]).toEqual([200, 200])
    expect(c2.body.version).toBe(c1.body.version)
  })

  it('refuses the same key with a different body (422), and keeps the first answer', async () => {
    const key = randomUUID()
    const first = await withKey(thermo(), url('findings'), { assetId: assets.A1, ...reading, phase: 'L2' }, key)
    expect(first.status).toBe(201)
    const other = await withKey(thermo(), url('findings'), { assetId: assets.A1, ...reading, phase: 'L3' }, key)
    expect(other.status).toBe(422)
    expect(other.body.data.message).toMatch(/already used for a different request/)
    const onOtherRoute = await withKey(thermo(), url('checks'), { assetId: assets.A1, outcome: 'finding' }, key)
    expect(onOtherRoute.status).toBe(422)
    expect(await testDb().selectFrom('findings').select('id').where('phase', '=', 'L3').execute()).toHaveLength(0)
  })

  it('stores nothing for a refused write, so the fixed item can be sent again with its key', async () => {
    const key = randomUUID()
    const refused = await withKey(thermo(), url('findings'), { assetId: assets.A1, ...reading, phase: 'L9', emissivity: 1.5 }, key)
    expect(refused.status).toBe(400)
    expect(refused.body.data.fieldErrors.emissivity).toBeTruthy()
    const fixed = await withKey(thermo(), url('findings'), { assetId: assets.A1, ...reading, phase: 'L9' }, key)
    expect(fixed.status).toBe(201)
    expect(await testDb().selectFrom('findings').select('id').where('phase', '=', 'L9').execute()).toHaveLength(1)
  })

  it('keeps keys per person and organisation, and refuses a malformed key', async () => {
    const key = randomUUID()
    const mine = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 13 }, key)
    expect(mine.status).toBe(200)
    // The same key from someone else is their own key: it is not a replay of Tam's request (and Oli may not record here).
    const theirs = await withKey(people.other!.client, url('conditions'), { siteId: sites.F1, ambientC: 13 }, key)
    expect(theirs.status).toBe(403)
    expect(await count('idempotency_keys', { key })).toBe(1)
    const bad = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 13 }, 'no spaces allowed')
    expect(bad.status).toBe(400)
    expect(bad.body.data.message).toMatch(/Idempotency-Key/)
  })

  it('forgets answered keys after 30 days in the scheduler housekeeping, and only those', async () => {
    const key = randomUUID()
    const saved = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 14 }, key)
    expect(saved.status).toBe(200)
    const prune = (days: number) => new ApiClient().post('/api/dev/notices/run', {
      now: new Date(Date.now() + days * 86_400_000).toISOString(), jobs: false, deliver: false, prune: true,
    })
    const early = await prune(29)
    expect(early.status).toBe(200)
    expect(await count('idempotency_keys', { key })).toBe(1)
    const late = await prune(31)
    expect(late.body.pruned.idempotencyKeys).toBeGreaterThanOrEqual(1)
    expect(await count('idempotency_keys', { key })).toBe(0)
    // After the key is forgotten, the same key is a new request again (a phone a month late writes once more).
    const again = await withKey(thermo(), url('conditions'), { siteId: sites.F1, ambientC: 14 }, key)
    expect(again.status).toBe(200)
    expect(again.headers.get('idempotent-replayed')).toBeNull()
  })
})

describe('a manager corrects a band on review', () => {
  let surveyId: string
  let finding: { id: string; version: number; band: number }
  beforeAll(async () => {
    surveyId = await startedSurvey([sites.F2!])
    const f = await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, { assetId: assets.B1, ...reading })
    finding = f.body
  })
  const rank = (c: ApiClient, body: unknown, id = finding.id, s = slug) => c.post(`/api/orgs/${s}/findings/${id}/rank`, body)

  it('waits until the survey is submitted', async () => {
    const early = await rank(people.manager!.client, { band: 2, reason: 'Connector re-torqued last spring; rise looks overstated.', version: finding.version })
    expect(early.status).toBe(409)
    expect(early.body.data.message).toMatch(/submitted/)
    const s = await thermo().get(`/api/orgs/${slug}/surveys/${surveyId}`)
    expect((await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: s.body.version })).status).toBe(200)
  })

  it('needs a written reason and a band from 1 to 4', async () => {
    const none = await rank(people.manager!.client, { band: 2, reason: '  ', version: finding.version })
    expect(none.status).toBe(400)
    expect(none.body.data.fieldErrors.reason[0]).toMatch(/at least 10 characters/)
    const short = await rank(people.manager!.client, { band: 2, reason: 'too low', version: finding.version })
    expect(short.body.data.fieldErrors.reason).toBeTruthy()
    const band = await rank(people.manager!.client, { band: 5, reason: 'A band that does not exist.', version: finding.version })
    expect(band.body.data.fieldErrors.band).toBeTruthy()
  })

  it('refuses thermographers, crew and viewers', async () => {
    for (const who of ['thermo', 'crew', 'viewer']) {
      const res = await rank(people[who]!.client, { band: 2, reason: 'I would like a milder band please.', version: finding.version })
      expect(res.status, who).toBe(403)
    }
  })

  it('keeps the computed band and the reviewed band with reason, who and when; lists use the reviewed band', async () => {
    expect(finding.band).toBe(1) // ANSI/NETA Table 100.18: over 40 K above ambient is the most severe band
    const res = await rank(people.manager!.client, { band: 2, reason: 'Load was 140 % of normal during the survey; see notes.', version: finding.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ band: 1, effectiveBand: 2, version: finding.version + 1 })
    expect(res.body.review).toMatchObject({ band: 2, reason: 'Load was 140 % of normal during the survey; see notes.', by: { id: people.manager!.id, name: 'Field manager' } })
    expect(Date.now() - Date.parse(res.body.review.at)).toBeLessThan(60_000)
    const survey = await owner.get(`/api/orgs/${slug}/surveys/${surveyId}`)
    expect(survey.body.summary.byBand).toEqual({ 2: 1 })
    expect((await owner.get(`/api/orgs/${slug}/findings?band=2&surveyId=${surveyId}`)).body.total).toBe(1)
    expect((await owner.get(`/api/orgs/${slug}/findings?band=1&surveyId=${surveyId}`)).body.total).toBe(0)
    const stale = await rank(people.manager!.client, { band: 3, reason: 'A second look from an old screen.', version: finding.version })
    expect(stale.status).toBe(409)
  })

  it('tells the managers when a milder finding is raised to band 1 on review, once', async () => {
    const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'F4', name: 'Fen F4', kind: 'substation', latitude: 52.3, longitude: 0.2 })
    const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'R1', assetClass: 'breaker' })
    const sid = await startedSurvey([site.body.id])
    // ANSI/NETA Table 100.18 over ambient: 21–40 K is the second most severe band; 34 °C apparent at ε 0.5 with 20 °C
    // reflected is about 49 °C, some 29 K over the 20 °C ambient.
    const mild = await thermo().post(`/api/orgs/${slug}/surveys/${sid}/findings`, { assetId: asset.body.id, ...reading, apparentC: 34 })
    expect(mild.status, JSON.stringify(mild.body)).toBe(201)
    expect(mild.body.band).toBeGreaterThan(1)
    const s = await thermo().get(`/api/orgs/${slug}/surveys/${sid}`)
    expect((await thermo().post(`/api/orgs/${slug}/surveys/${sid}/submit`, { version: s.body.version })).status).toBe(200)
    const band1 = () => testDb().selectFrom('notices').select(['user_id', 'body'])
      .where('kind', '=', 'finding_band1').where('dedupe_key', '=', `finding_band1:${mild.body.id}`).execute()
    expect(await band1()).toHaveLength(0)
    const raised = await rank(people.manager!.client, { band: 1, reason: 'Discoloured insulation seen beside the joint.', version: mild.body.version }, mild.body.id)
    expect(raised.status, JSON.stringify(raised.body)).toBe(200)
    const told = await band1()
    expect(told.map((n) => n.user_id)).toEqual([ownerId])
    expect(told[0]!.body).toMatch(/corrected a finding .* to band 1/)
    // Lowered and raised again: still one notice per person.
    const lowered = await rank(people.manager!.client, { band: 2, reason: 'Second opinion: insulation is only dirty.', version: raised.body.version }, mild.body.id)
    await rank(people.manager!.client, { band: 1, reason: 'Third opinion: it is discoloured after all.', version: lowered.body.version }, mild.body.id)
    expect(await band1()).toHaveLength(1)
  })

  it('does not find another organisation’s finding', async () => {
    const { client: stranger, slug: otherSlug } = await signUpOwner('Sid Stranger', 'sid@elsewhere.test', 'Sid Elsewhere')
    const res = await rank(stranger, { band: 4, reason: 'Reaching into another organisation.', version: 2 }, finding.id, otherSlug)
    expect(res.status).toBe(404)
    const across = await rank(stranger, { band: 4, reason: 'Reaching into another organisation.', version: 2 })
    expect(across.status).toBe(404)
  })
})

describe('the assigned thermographer edits a saved finding', () => {
  let surveyId: string
  let finding: { id: string; version: number; objectC: number; band: number; assetId: string }
  beforeAll(async () => {
    surveyId = await startedSurvey([sites.F3!])
    finding = (await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, { assetId: assets.H1, ...reading })).body
  })
  const edit = (c: ApiClient, body: Record<string, unknown>) => c.patch(`/api/orgs/${slug}/findings/${finding.id}`, { assetId: assets.H1, ...reading, ...body })

  it('recomputes on the server with the engine', async () => {
    expect(finding.objectC).toBeCloseTo(74.34, 2) // reference sheet §5 [C]
    const res = await edit(thermo(), { emissivity: 0.95, objectC: 1, band: 4, version: finding.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.inputs.emissivity).toBe(0.95)
    // A higher ε means less of the reading is reflection: the object is barely hotter than it appears.
    expect(res.body.objectC).toBeGreaterThan(50)
    expect(res.body.objectC).toBeLessThan(53)
    // ANSI/NETA Table 100.18: 21–40 K over ambient is the second band; the client's band: 4 was ignored.
    expect(res.body.band).toBe(2)
    expect(res.body.band).toBe(rankRise({ overAmbientK: res.body.riseOverAmbientK }, NETA_100_18).band)
    expect(res.body.version).toBe(finding.version + 1)
    finding = res.body
  })

  it('answers 409 with a clear message on a stale version', async () => {
    const res = await edit(thermo(), { notes: 'From a phone that had the old copy', version: finding.version - 1 })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/changed since you opened it/)
    const row = await testDb().selectFrom('findings').select('notes').where('id', '=', finding.id).executeTakeFirstOrThrow()
    expect(row.notes).toBe('')
  })

  it('is refused to anyone but the assigned thermographer, and keeps the finding on its asset', async () => {
    expect((await edit(people.other!.client, { version: finding.version })).status).toBe(403)
    expect((await edit(owner, { version: finding.version })).status).toBe(403)
    expect((await edit(people.viewer!.client, { version: finding.version })).status).toBe(403)
    const moved = await edit(thermo(), { assetId: assets.A1, version: finding.version })
    expect(moved.status).toBe(400)
    expect(moved.body.data.fieldErrors.assetId).toBeTruthy()
    const bad = await edit(thermo(), { emissivity: 0, version: finding.version })
    expect(bad.body.data.fieldErrors.emissivity).toBeTruthy()
  })

  it('records the surface picked for ε, from this organisation only', async () => {
    const surface = await owner.post(`/api/orgs/${slug}/surfaces`, { name: 'Painted steel (field test)', emissivity: 0.9, method: 'contact_thermometer' })
    expect(surface.status, JSON.stringify(surface.body)).toBe(201)
    const res = await edit(thermo(), { emissivity: 0.9, surfaceId: surface.body.id, version: finding.version })
    expect(res.status).toBe(200)
    expect(res.body.surfaceId).toBe(surface.body.id)
    finding = res.body
    const { client: stranger, slug: otherSlug } = await signUpOwner('Pia Paint', 'pia@elsewhere.test', 'Pia Elsewhere')
    const foreign = await stranger.post(`/api/orgs/${otherSlug}/surfaces`, { name: 'Foreign paint', emissivity: 0.8, method: 'contact_thermometer' })
    const refused = await edit(thermo(), { surfaceId: foreign.body.id, version: finding.version })
    expect(refused.status).toBe(400)
    expect(refused.body.data.fieldErrors.surfaceId).toBeTruthy()
  })

  it('is closed once the survey is submitted', async () => {
    const s = await thermo().get(`/api/orgs/${slug}/surveys/${surveyId}`)
    expect((await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: s.body.version })).status).toBe(200)
    const late = await edit(thermo(), { notes: 'One more thing', version: finding.version })
    expect(late.status).toBe(409)
    expect(late.body.data.message).toMatch(/in progress or returned/)
  })
})

describe('asset history', () => {
  it('lists every check and finding of an asset, newest survey first, a page at a time', async () => {
    // A second, later survey on F1: A1 clear this time.
    const s = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2027-06-01', thermographerId: people.thermo!.id, instrumentId, siteIds: [sites.F1] })
    await thermo().post(`/api/orgs/${slug}/surveys/${s.body.id}/start`, { version: s.body.version })
    await thermo().post(`/api/orgs/${slug}/surveys/${s.body.id}/checks`, { assetId: assets.A1, outcome: 'clear' })
    const all = await people.viewer!.client.get(`/api/orgs/${slug}/assets/${assets.A1}/history`)
    expect(all.status).toBe(200)
    expect(all.body.total).toBe(2)
    expect(all.body.items.map((i: { plannedFor: string; outcome: string; findings: unknown[] }) => [i.plannedFor, i.outcome, i.findings.length]))
      .toEqual([['2027-06-01', 'clear', 0], ['2026-12-02', 'finding', 3]])
    expect(all.body.items[1].findings.map((f: { phase: string }) => f.phase)).toEqual(['L1', 'L2', 'L9'])
    const page2 = await owner.get(`/api/orgs/${slug}/assets/${assets.A1}/history?pageSize=1&page=2`)
    expect(page2.body).toMatchObject({ total: 2, page: 2, pageSize: 1 })
    expect(page2.body.items.map((i: { plannedFor: string }) => i.plannedFor)).toEqual(['2026-12-02'])
    const bad = await owner.get(`/api/orgs/${slug}/assets/${assets.A1}/history?pageSize=500`)
    expect(bad.status).toBe(400)
  })

  it('shows a reviewed band as corrected', async () => {
    const res = await owner.get(`/api/orgs/${slug}/assets/${assets.B1}/history`)
    expect(res.body.items[0].findings[0]).toMatchObject({ band: 1, effectiveBand: 2, corrected: true })
  })

  it('does not show another organisation’s asset', async () => {
    const { client: stranger, slug: otherSlug } = await signUpOwner('Hal History', 'hal@elsewhere.test', 'Hal Elsewhere')
    expect((await stranger.get(`/api/orgs/${otherSlug}/assets/${assets.A1}/history`)).status).toBe(404)
    expect((await stranger.get(`/api/orgs/${slug}/assets/${assets.A1}/history`)).status).toBe(404)
  })
})
