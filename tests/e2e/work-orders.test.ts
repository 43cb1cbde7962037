import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { addDays, todayIn } from '../../shared/schedule'

// Work orders from raising to a verified close: due dates from the band's repair deadline, the crew's moves,
// defer and cancel with reasons, role refusals, both outcomes of a verification, and the timeline.

let owner: ApiClient
let slug: string
let orgId: string
let instrumentId: string
let today: string
const sites: Record<string, string> = {}
const assets: Record<string, string> = {}
const findings: Record<string, string> = {}
const people: Record<string, { client: ApiClient; id: string }> = {}

async function join(key: string, role: string, email: string) {
  people[key] = await joinByInvitation(owner, slug, email, role, `WO ${key}`, 'repair password')
}

// ε = 1 and no transmittance: the object temperature equals the apparent one, so the rise over ambient is simply
// apparent − ambient and the bands below are those of ANSI/NETA Table 100.18 over ambient (1–10 K → 4, above 20 to 40 K → 2,
// above 40 K → 1; below 1 K not ranked).
const reading = (apparentC: number) => ({ apparentC, ambientC: 20, emissivity: 1, reflectedC: 20, reflectedMethod: 'direct' })

const api = (p: string) => `/api/orgs/${slug}${p}`

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Wyn Owner', 'wyn@wo.test', 'Wyn Power'))
  await join('manager', 'manager', 'mae@wo.test')
  await join('crew', 'crew', 'cal@wo.test')
  await join('crew2', 'crew', 'cora@wo.test')
  await join('thermo', 'thermographer', 'theo@wo.test')
  await join('thermo2', 'thermographer', 'tess@wo.test')
  await join('viewer', 'viewer', 'vic@wo.test')
  const org = await owner.get(api(''))
  today = todayIn(org.body.timeZone)
  orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  for (const [code, lat] of [['W1', 54.1], ['W2', 54.2]] as const) {
    const s = await owner.post(api('/sites'), { code, name: `West ${code}`, kind: 'substation', latitude: lat, longitude: -2.9 })
    sites[code] = s.body.id
  }
  for (const [label, site] of [['T1', 'W1'], ['CB1', 'W1'], ['T2', 'W2']] as const) {
    const a = await owner.post(api('/assets'), { siteId: sites[site], label, assetClass: 'transformer' })
    assets[label] = a.body.id
  }
  const inst = await owner.post(api('/instruments'), { make: 'Halden', model: 'T8', serial: 'WO-814', bandFromUm: 8, bandToUm: 14 })
  instrumentId = inst.body.id
  const survey = await owner.post(api('/surveys'), { plannedFor: today, thermographerId: people.thermo!.id, instrumentId, siteIds: [sites.W1, sites.W2] })
  const start = await people.thermo!.client.post(api(`/surveys/${survey.body.id}/start`), { version: survey.body.version })
  expect(start.status, JSON.stringify(start.body)).toBe(200)
  for (const [key, asset, apparent] of [['band2', 'T1', 50], ['band4', 'CB1', 28], ['band1', 'T2', 70]] as const) {
    const f = await people.thermo!.client.post(api(`/surveys/${survey.body.id}/findings`), {
      assetId: assets[asset], component: `${asset} top connector`, probableCause: 'loose_connection', ...reading(apparent),
    })
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    findings[key] = f.body.id
  }
}, 120_000)

describe('raising a work order', () => {
  it('offers the open findings by site, with their bands', async () => {
    const res = await people.manager!.client.get(api('/work-orders/candidates'))
    expect(res.status).toBe(200)
    const w1 = res.body.find((c: { site: { code: string } }) => c.site.code === 'W1')
    expect(w1.findings.map((f: { effectiveBand: number }) => f.effectiveBand)).toEqual([2, 4])
  })

  it('takes its due date from the most severe band\'s repair deadline (band 2: 30 days by default)', async () => {
    const res = await people.manager!.client.post(api('/work-orders'), {
      findingIds: [findings.band2, findings.band4], instructions: 'Isolate under permit before touching anything.', assigneeIds: [people.crew!.id],
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({ number: 1, reference: 'WO-1', state: 'open', band: 2, findingCount: 2 })
    // Default deadline for band 2: about 30 days (reference sheet §6, common practice).
    expect(res.body.dueOn).toBe(addDays(today, 30))
    expect(res.body.assignees.map((a: { name: string }) => a.name)).toEqual(['WO crew'])
    expect(res.body.findings[0].reading).toMatchObject({ apparentC: 50, ambientC: 20 })
    expect(res.body.findings[0].reading.riseOverAmbientK).toBeCloseTo(30, 6)
    expect(res.body.timeline.map((e: { action: string }) => e.action)).toEqual(['raised', 'raised', 'raised', 'assigned'])
  })

  it('uses the organisation\'s own deadlines once an owner changes them', async () => {
    const before = await owner.get(api('/work-orders/settings'))
    expect(before.body).toMatchObject({ repairDaysBand1: 1, repairDaysBand2: 30, repairDaysBand3: 180, repairDaysBand4: null })
    const refused = await people.manager!.client.request('PATCH', api('/work-orders/settings'), { repairDaysBand1: 3, version: before.body.version })
    expect(refused.status).toBe(403)
    const bad = await owner.request('PATCH', api('/work-orders/settings'), { repairDaysBand1: -1, version: before.body.version })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.repairDaysBand1).toBeTruthy()
    const saved = await owner.request('PATCH', api('/work-orders/settings'), { repairDaysBand1: 3, version: before.body.version })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    const res = await owner.post(api('/work-orders'), { findingIds: [findings.band1], title: 'Hot top connector on T2' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ reference: 'WO-2', band: 1, dueOn: addDays(today, 3), title: 'Hot top connector on T2' })
  })

  it('refuses findings of two sites, findings already on an active work order, and people who cannot repair', async () => {
    const mixed = await owner.post(api('/work-orders'), { findingIds: [findings.band2, findings.band1] })
    expect(mixed.status).toBe(400)
    expect(mixed.body.data.fieldErrors.findingIds[0]).toMatch(/one site/)
    const again = await owner.post(api('/work-orders'), { findingIds: [findings.band4] })
    expect(again.status).toBe(409)
    expect(again.body.data.fieldErrors.findingIds[0]).toMatch(/WO-1/)
    const none = await owner.post(api('/work-orders'), { findingIds: [] })
    expect(none.body.data.fieldErrors.findingIds).toBeTruthy()
    const wo1 = (await owner.get(api('/work-orders?q=WO-1'))).body.items[0]
    const viewerAssigned = await owner.request('PATCH', api(`/work-orders/${wo1.id}`), { assigneeIds: [people.viewer!.id], version: wo1.version })
    expect(viewerAssigned.status).toBe(400)
    expect(viewerAssigned.body.data.fieldErrors.assigneeIds[0]).toMatch(/crew/)
  })

  it('does not let thermographers, crew or viewers raise', async () => {
    for (const key of ['thermo', 'crew', 'viewer']) {
      const res = await people[key]!.client.post(api('/work-orders'), { findingIds: [findings.band4] })
      expect(res.status, key).toBe(403)
    }
  })
})

describe('working a work order', () => {
  let wo: { id: string; version: number }
  const url = (p = '') => api(`/work-orders/${wo.id}${p}`)

  beforeAll(async () => {
    const list = await owner.get(api('/work-orders?q=WO-1'))
    wo = list.body.items[0]
  })

  it('shows the crew member their own work orders, sorted by due date then band', async () => {
    const mine = await people.crew!.client.get(api('/work-orders?mine=true&state=active'))
    expect(mine.status).toBe(200)
    expect(mine.body.items.map((w: { reference: string }) => w.reference)).toEqual(['WO-1'])
    const all = await people.viewer!.client.get(api('/work-orders?sort=due&pageSize=1'))
    expect(all.body.total).toBe(2)
    expect(all.body.items.map((w: { reference: string }) => w.reference)).toEqual(['WO-2'])
    const band1 = await owner.get(api('/work-orders?band=1'))
    expect(band1.body.items.map((w: { reference: string }) => w.reference)).toEqual(['WO-2'])
    const site = await owner.get(api(`/work-orders?siteId=${sites.W1}`))
    expect(site.body.items.map((w: { reference: string }) => w.reference)).toEqual(['WO-1'])
  })

  it('lets only the assigned crew (or a manager) move it, and only along the allowed steps', async () => {
    const other = await people.crew2!.client.post(url('/move'), { to: 'planned', version: wo.version })
    expect(other.status).toBe(403)
    expect(other.body.data.message).toMatch(/assigned/)
    const thermo = await people.thermo!.client.post(url('/move'), { to: 'planned', version: wo.version })
    expect(thermo.status).toBe(403)
    const skip = await people.crew!.client.post(url('/move'), { to: 'awaiting_verification', version: wo.version })
    expect(skip.status).toBe(409)
    const planned = await people.crew!.client.post(url('/move'), { to: 'planned', version: wo.version })
    expect(planned.status, JSON.stringify(planned.body)).toBe(200)
    expect(planned.body.state).toBe('planned')
    const stale = await people.crew!.client.post(url('/move'), { to: 'in_repair', version: wo.version })
    expect(stale.status).toBe(409)
    const repair = await people.crew!.client.post(url('/move'), { to: 'in_repair', version: planned.body.version })
    expect(repair.body.state).toBe('in_repair')
    wo = repair.body
  })

  it('records what was done', async () => {
    const bad = await people.crew!.client.post(url('/work'), { timeSpentMinutes: 'an hour', version: wo.version })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.timeSpentMinutes).toBeTruthy()
    const res = await people.crew!.client.post(url('/work'), {
      causeFound: 'Bolt under-torqued', parts: '1 × M12 Belleville washer', workDone: 'Cleaned and re-torqued', timeSpentMinutes: '45', version: wo.version,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ causeFound: 'Bolt under-torqued', parts: '1 × M12 Belleville washer', timeSpentMinutes: 45 })
    wo = res.body
  })

  it('defers with a reason and a new date, which becomes the due date', async () => {
    const noReason = await people.crew!.client.post(url('/defer'), { reason: '', until: addDays(today, 20), version: wo.version })
    expect(noReason.status).toBe(400)
    expect(noReason.body.data.fieldErrors.reason).toBeTruthy()
    const past = await people.crew!.client.post(url('/defer'), { reason: 'Outage needed', until: today, version: wo.version })
    expect(past.status).toBe(400)
    expect(past.body.data.fieldErrors.until).toBeTruthy()
    const res = await people.crew!.client.post(url('/defer'), { reason: 'Needs an outage; next window in 3 weeks', until: addDays(today, 21), version: wo.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ state: 'deferred', deferredUntil: addDays(today, 21), dueOn: addDays(today, 21), stateReason: 'Needs an outage; next window in 3 weeks' })
    const back = await people.crew!.client.post(url('/move'), { to: 'in_repair', version: res.body.version })
    expect(back.body).toMatchObject({ state: 'in_repair', deferredUntil: null })
    wo = back.body
  })

  it('does not let crew cancel, nor rank findings', async () => {
    const cancel = await people.crew!.client.post(url('/cancel'), { reason: 'Not needed', version: wo.version })
    expect(cancel.status).toBe(403)
    const surveys = await owner.get(api('/surveys'))
    const rank = await people.crew!.client.post(api(`/surveys/${surveys.body.items[0].id}/findings`), { assetId: assets.T1, component: 'x', probableCause: 'overload', ...reading(60) })
    expect(rank.status).toBe(403)
  })

  it('asks for verification: one waiting re-scan per open finding, for the chosen thermographer', async () => {
    const stranger = await people.crew!.client.post(url('/move'), { to: 'awaiting_verification', thermographerId: people.crew2!.id, version: wo.version })
    expect(stranger.status).toBe(400)
    expect(stranger.body.data.fieldErrors.thermographerId).toBeTruthy()
    const res = await people.crew!.client.post(url('/move'), { to: 'awaiting_verification', thermographerId: people.thermo!.id, version: wo.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.state).toBe('awaiting_verification')
    expect(res.body.verifications.map((v: { state: string; thermographer: { name: string } }) => [v.state, v.thermographer.name])).toEqual([['waiting', 'WO thermo'], ['waiting', 'WO thermo']])
    const waiting = await people.thermo!.client.get(api('/verifications?mine=true&state=waiting'))
    expect(waiting.body.total).toBe(2)
    const notMine = await people.thermo2!.client.get(api('/verifications?mine=true&state=waiting'))
    expect(notMine.body.total).toBe(0)
    wo = res.body
  })

  it('a re-scan that still ranks reopens the work order with the new reading, and tells everyone assigned', async () => {
    const detail = await owner.get(url())
    const v = detail.body.verifications.find((x: { finding: { id: string } }) => x.finding.id === findings.band2)
    const crewRefused = await people.crew!.client.post(api(`/verifications/${v.id}/reading`), { ...reading(45), instrumentId, version: v.version })
    expect(crewRefused.status).toBe(403)
    const otherThermo = await people.thermo2!.client.post(api(`/verifications/${v.id}/reading`), { ...reading(45), instrumentId, version: v.version })
    expect(otherThermo.status).toBe(403)
    const noImager = await people.thermo!.client.post(api(`/verifications/${v.id}/reading`), { ...reading(45), version: v.version })
    expect(noImager.body.data.fieldErrors.instrumentId).toBeTruthy()
    // 45 − 20 = 25 K over ambient: band 2 of ANSI/NETA Table 100.18 (above 20 to 40 K).
    const res = await people.thermo!.client.post(api(`/verifications/${v.id}/reading`), { ...reading(45), instrumentId, version: v.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.state).toBe('failed')
    expect(res.body.reading.band).toBe(2)
    expect(res.body.reading.riseOverAmbientK).toBeCloseTo(25, 6)
    const after = await owner.get(url())
    expect(after.body.state).toBe('open')
    expect(after.body.stateReason).toMatch(/still ranks band 2/)
    expect(after.body.verifications.map((x: { state: string }) => x.state).sort()).toEqual(['failed', 'withdrawn'])
    expect(after.body.verifications.find((x: { state: string }) => x.state === 'failed').reading.apparentC).toBe(45)
    const again = await people.thermo!.client.post(api(`/verifications/${v.id}/reading`), { ...reading(21), instrumentId, version: res.body.version })
    expect(again.status).toBe(409)
    const notices = await testDb().selectFrom('notices').select(['user_id', 'kind']).where('organisation_id', '=', orgId).where('kind', '=', 'work_order_reopened').execute()
    expect(notices.map((n) => n.user_id)).toEqual([people.crew!.id])
    wo = after.body
  })

  it('a re-scan below the lowest band closes the finding, and the work order once every finding is verified', async () => {
    const planned = await people.crew!.client.post(url('/move'), { to: 'in_repair', version: wo.version })
    const asked = await people.crew!.client.post(url('/move'), { to: 'awaiting_verification', thermographerId: null, version: planned.body.version })
    expect(asked.status, JSON.stringify(asked.body)).toBe(200)
    const waiting = asked.body.verifications.filter((v: { state: string }) => v.state === 'waiting')
    expect(waiting).toHaveLength(2)
    expect(waiting.every((v: { thermographer: unknown }) => v.thermographer === null)).toBe(true)
    // Unassigned: whoever re-scans the site picks it up. 20.5 − 20 = 0.5 K, below the 1 K where ranking starts (NETA Table 100.18).
    const unassigned = waiting.find((v: { finding: { id: string } }) => v.finding.id === findings.band4)
    // A manager may name the thermographer afterwards; the crew may not.
    const crewAssign = await people.crew!.client.request('PATCH', api(`/verifications/${unassigned.id}`), { thermographerId: people.thermo2!.id, version: unassigned.version })
    expect(crewAssign.status).toBe(403)
    const notThermo = await people.manager!.client.request('PATCH', api(`/verifications/${unassigned.id}`), { thermographerId: people.crew!.id, version: unassigned.version })
    expect(notThermo.body.data.fieldErrors.thermographerId).toBeTruthy()
    const assigned = await people.manager!.client.request('PATCH', api(`/verifications/${unassigned.id}`), { thermographerId: people.thermo2!.id, version: unassigned.version })
    expect(assigned.status, JSON.stringify(assigned.body)).toBe(200)
    expect(assigned.body.thermographer.name).toBe('WO thermo2')
    const first = assigned.body
    const wrongThermo = await people.thermo!.client.post(api(`/verifications/${first.id}/reading`), { ...reading(20.5), instrumentId, version: first.version })
    expect(wrongThermo.status).toBe(403)
    const pass1 = await people.thermo2!.client.post(api(`/verifications/${first.id}/reading`), { ...reading(20.5), instrumentId, version: first.version })
    expect(pass1.status, JSON.stringify(pass1.body)).toBe(200)
    expect(pass1.body).toMatchObject({ state: 'passed', thermographer: { name: 'WO thermo2' } })
    expect(pass1.body.reading.band).toBeNull()
    const mid = await owner.get(url())
    expect(mid.body.state).toBe('awaiting_verification')
    expect(mid.body.findings.find((f: { id: string }) => f.id === findings.band4).closedAt).toBeTruthy()
    const second = waiting.find((v: { finding: { id: string } }) => v.finding.id === findings.band2)
    const pass2 = await people.thermo!.client.post(api(`/verifications/${second.id}/reading`), { ...reading(20.8), instrumentId, version: second.version })
    expect(pass2.body.state).toBe('passed')
    const done = await owner.get(url())
    expect(done.body.state).toBe('closed')
    expect(done.body.closedAt).toBeTruthy()
    for (const f of done.body.findings) {
      expect(f.closedAt).toBeTruthy()
      expect(f.closedReason).toMatch(/Verified repaired/)
    }
    const row = await testDb().selectFrom('findings').select(['closed_at', 'closed_reason']).where('id', '=', findings.band2!).executeTakeFirstOrThrow()
    expect(row.closed_at).not.toBeNull()
    // Closed findings are no longer offered for raising.
    const candidates = await owner.get(api('/work-orders/candidates'))
    // (the band 1 finding is on WO-2, the other two are closed)
    expect(candidates.body).toEqual([])
  })

  it('keeps every step on the timeline: who, when, what and why', async () => {
    const res = await people.viewer!.client.get(url())
    const entries = res.body.timeline as Array<{ action: string; actor: { name: string } | null; reason: string; summary: string; at: string }>
    const actions = entries.map((e) => e.action)
    for (const a of ['raised', 'assigned', 'state_changed', 'work_recorded', 'deferred', 'verification_requested', 'verification_failed',
      'verification_withdrawn', 'reopened', 'verification_passed', 'closed_verified', 'closed']) {
      expect(actions, a).toContain(a)
    }
    expect(actions.at(-1)).toBe('closed')
    const deferred = entries.find((e) => e.action === 'deferred')!
    expect(deferred).toMatchObject({ actor: { name: 'WO crew' }, reason: 'Needs an outage; next window in 3 weeks' })
    expect(deferred.summary).toContain(addDays(today, 21))
    const failed = entries.find((e) => e.action === 'verification_failed')!
    expect(failed.actor!.name).toBe('WO thermo')
    expect(entries.map((e) => e.at)).toEqual([...entries.map((e) => e.at)].sort())
    const findingTimeline = await people.viewer!.client.get(api(`/findings/${findings.band2}/timeline`))
    expect(findingTimeline.status).toBe(200)
    expect(findingTimeline.body.map((e: { action: string }) => e.action)).toEqual(expect.arrayContaining(['raised', 'verification_failed', 'closed_verified']))
  })

  it('refuses changes to a closed work order', async () => {
    const latest = await owner.get(url())
    const res = await people.crew!.client.post(url('/move'), { to: 'open', version: latest.body.version })
    expect(res.status).toBe(409)
    const cancel = await owner.post(url('/cancel'), { reason: 'Too late', version: latest.body.version })
    expect(cancel.status).toBe(409)
  })
})

describe('cancelling', () => {
  it('lets a manager cancel with a reason; the finding can be raised again', async () => {
    const list = await owner.get(api('/work-orders?q=WO-2'))
    const wo = list.body.items[0]
    expect(wo.reference).toBe('WO-2')
    const noReason = await people.manager!.client.post(api(`/work-orders/${wo.id}/cancel`), { reason: ' ', version: wo.version })
    expect(noReason.body.data.fieldErrors.reason).toBeTruthy()
    const res = await people.manager!.client.post(api(`/work-orders/${wo.id}/cancel`), { reason: 'Asset to be replaced under the capital plan', version: wo.version })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ state: 'cancelled', stateReason: 'Asset to be replaced under the capital plan' })
    expect(res.body.timeline.at(-1)).toMatchObject({ action: 'cancelled', reason: 'Asset to be replaced under the capital plan', actor: { name: 'WO manager' } })
    const active = await owner.get(api('/work-orders?state=active'))
    expect(active.body.total).toBe(0)
    const again = await owner.post(api('/work-orders'), { findingIds: [findings.band1] })
    expect(again.status).toBe(201)
    expect(again.body.reference).toBe('WO-3')
  })

  it('nothing is deleted: every work order, verification and event is still stored', async () => {
    const db = testDb()
    const count = async (t: 'work_orders' | 'verifications' | 'record_events') =>
      Number((await db.selectFrom(t).select((eb) => eb.fn.countAll<number>().as('n')).where('organisation_id', '=', orgId).executeTakeFirstOrThrow()).n)
    expect(await count('work_orders')).toBe(3)
    expect(await count('verifications')).toBe(4)
    expect(await count('record_events')).toBeGreaterThan(20)
  })
})

describe('overdue', () => {
  it('lists work orders past their due date as overdue', async () => {
    const db = testDb()
    const wo = await db.selectFrom('work_orders').select('id').where('organisation_id', '=', orgId).where('number', '=', 3).executeTakeFirstOrThrow()
    await db.updateTable('work_orders').set({ due_on: addDays(today, -2) }).where('id', '=', wo.id).execute()
    const res = await owner.get(api('/work-orders?overdue=true'))
    expect(res.body.items.map((w: { reference: string; overdue: boolean }) => [w.reference, w.overdue])).toEqual([['WO-3', true]])
  })
})
