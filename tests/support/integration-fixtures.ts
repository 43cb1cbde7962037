import { expect } from 'vitest'
import { ApiClient, signUpOwner } from './api'

// An organisation with one site, assets, an imager and surveys with findings, built through the public API.
// The owner runs the surveys (owners hold surveys.run), so no invitations are needed.

export interface Org { owner: ApiClient; slug: string; ownerId: string; siteId: string; assets: Record<string, string>; instrumentId: string }

export async function makeOrg(prefix: string, assetLabels: string[] = ['T1', 'CB1']): Promise<Org> {
  const { client: owner, slug, userId: ownerId } = await signUpOwner(`${prefix} Owner`, `${prefix}-owner@integration.test`, `${prefix} Power`)
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: `${prefix.toUpperCase()}-1`, name: `${prefix} grid`, kind: 'substation', latitude: 54.4, longitude: -2.9 })
  expect(site.status, JSON.stringify(site.body)).toBe(201)
  const assets: Record<string, string> = {}
  for (const label of assetLabels) {
    const a = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label, assetClass: 'transformer' })
    expect(a.status, JSON.stringify(a.body)).toBe(201)
    assets[label] = a.body.id
  }
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: `${prefix}-814`, bandFromUm: 8, bandToUm: 14 })
  expect(inst.status, JSON.stringify(inst.body)).toBe(201)
  return { owner, slug, ownerId, siteId: site.body.id, assets, instrumentId: inst.body.id }
}

export interface ReadingInput { asset: string; component: string; phase?: string; apparentC: number; referenceC?: number; ambientC?: number; loadA?: number; ratedA?: number }

/**
 * Plans a survey of the site for `date`, starts it, records the findings (ε = 1, so the object temperature is the
 * apparent one and each rise is the plain difference of the typed temperatures), marks the other assets clear and
 * submits it. Returns the survey id and the finding ids in order.
 */
export async function surveyWith(org: Org, date: string, readings: ReadingInput[], opts: { submit?: boolean } = {}): Promise<{ surveyId: string; findingIds: string[] }> {
  const { owner, slug } = org
  const plan = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: date, thermographerId: org.ownerId, instrumentId: org.instrumentId, siteIds: [org.siteId] })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  const surveyId = plan.body.id as string
  const start = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: plan.body.version })
  expect(start.status, JSON.stringify(start.body)).toBe(200)
  const findingIds: string[] = []
  for (const r of readings) {
    const res = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, {
      assetId: org.assets[r.asset], component: r.component, phase: r.phase, apparentC: r.apparentC, referenceC: r.referenceC, ambientC: r.ambientC ?? 15,
      emissivity: 1, reflectedC: 20, reflectedMethod: 'direct', distanceM: 3, loadA: r.loadA, ratedA: r.ratedA, probableCause: 'loose_connection',
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    findingIds.push(res.body.id)
  }
  const withFindings = new Set(readings.map((r) => r.asset))
  for (const [label, id] of Object.entries(org.assets)) {
    if (withFindings.has(label)) continue
    const c = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/checks`, { assetId: id, outcome: 'clear' })
    expect(c.status, JSON.stringify(c.body)).toBe(200)
  }
  if (opts.submit !== false) {
    const current = await owner.get(`/api/orgs/${slug}/surveys/${surveyId}`)
    const sub = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: current.body.version })
    expect(sub.status, JSON.stringify(sub.body)).toBe(200)
  }
  return { surveyId, findingIds }
}

/** Sends a request with an API token (and no cookies). */
export async function withToken(baseUrl: string, token: string, method: string, path: string, body?: unknown) {
  const headers: Record<string, string> = { accept: 'application/json', authorization: `Bearer ${token}` }
  if (body !== undefined) headers['content-type'] = 'application/json'
  const res = await fetch(`${baseUrl}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
  const text = await res.text()
  let parsed: any = text
  try { parsed = text ? JSON.parse(text) : null } catch { /* CSV or text */ }
  return { status: res.status, body: parsed, headers: res.headers, text }
}
