import { readdirSync, statSync } from 'node:fs'
import path from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { resetDatabase } from '../support/db'
import { ROOT } from '../support/env'
import { ORG_ROUTES, type OrgRoute } from '../support/org-routes'
import { pngBytes, uploadImage } from '../support/images'
import { reviewedSurvey, waitForReport } from '../support/reports'
import { ROLES, can, type Role } from '../../shared/permissions'

interface Tenant { owner: ApiClient; slug: string; ownerId: string; invitationId: string; members: Record<Role, ApiClient>; memberIds: Record<Role, string>; siteId: string; assetId: string; registerImportId: string; instrumentId: string; surfaceId: string; routeId: string; surveyId: string; findingId: string; attachmentId: string; gridId: string; apiTokenId: string; reportId: string; workOrderId: string; workOrderAttachmentId: string; verificationId: string }

let a: Tenant
let b: Tenant

// Builds an organisation with one member per role (and a pending invitation), all through the public API.
async function tenant(prefix: string): Promise<Tenant> {
  const { client: owner, slug, userId: ownerId } = await signUpOwner(`${prefix} Owner`, `${prefix}-owner@tenancy.test`, `${prefix} Utility`)
  const members = { owner } as Record<Role, ApiClient>
  for (const role of ROLES.filter((r) => r !== 'owner')) {
    const email = `${prefix}-${role}@tenancy.test`
    await owner.post(`/api/orgs/${slug}/invitations`, { email, role })
    const [mail] = await mailFor(email)
    const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
    const c = new ApiClient()
    await c.post('/api/account/sign-up', { name: `${prefix} ${role}`, email, password: 'tenancy password', invitationToken: token })
    await c.signIn(email, 'tenancy password')
    members[role] = c
  }
  const list = (await owner.get(`/api/orgs/${slug}/members`)).body as Array<{ email: string; role: Role; userId: string }>
  const memberIds = Object.fromEntries(list.map((m) => [m.role, m.userId])) as Record<Role, string>
  const inv = await owner.post(`/api/orgs/${slug}/invitations`, { email: `${prefix}-pending@tenancy.test`, role: 'viewer' })
  // Register rows for routes that take a site, asset or import id.
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: `${prefix}-S1`, name: `${prefix} site`, kind: 'substation', latitude: 54.4, longitude: -2.9 })
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'T1', assetClass: 'transformer' })
  const upload = await owner.post(`/api/orgs/${slug}/register-imports`, { kind: 'sites', fileName: `${prefix}.csv`, totalChars: 20 })
  // Programme rows for routes that take an instrument, surface or route id.
  const instrument = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T1', serial: `${prefix}-1`, bandFromUm: 7.5, bandToUm: 14 })
  const surface = await owner.post(`/api/orgs/${slug}/surfaces`, { name: `${prefix} clamp`, emissivity: 0.4, method: 'reference_emitter' })
  const route = await owner.post(`/api/orgs/${slug}/routes`, { name: `${prefix} route`, baseName: 'Depot', baseLatitude: 54, baseLongitude: -3, recurrenceMonths: 12, siteIds: [site.body.id] })
  // A survey for routes that take a survey id, run by the tenant's thermographer.
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: memberIds.thermographer, instrumentId: instrument.body.id, routeId: route.body.id })
  // A finding for routes that take a finding id, recorded by that thermographer on the started survey.
  await members.thermographer.post(`/api/orgs/${slug}/surveys/${survey.body.id}/start`, { version: 1 })
  const finding = await members.thermographer.post(`/api/orgs/${slug}/surveys/${survey.body.id}/findings`, {
    assetId: asset.body.id, component: 'Line-side lug', apparentC: 60, referenceC: 30, ambientC: 20, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'loose_connection',
  })
  if (finding.status !== 201) throw new Error(`tenant finding: ${finding.status} ${JSON.stringify(finding.body)}`)
  // A stored image on that finding, for routes that take an attachment id.
  const image = await uploadImage(members.thermographer, `/api/orgs/${slug}/findings/${finding.body.id}/attachments`, await pngBytes())
  if (image.complete?.status !== 200) throw new Error(`tenant image: ${image.begin.status} ${JSON.stringify(image.complete?.body ?? image.begin.body)}`)
  // A temperature grid on that survey's asset, for routes that take a grid id.
  const grid = await members.thermographer.post(`/api/orgs/${slug}/surveys/${survey.body.id}/grids`, { assetId: asset.body.id, unit: 'C', fileName: 'tenancy.csv', csv: '20,21\n22,60\n' })
  if (grid.status !== 201) throw new Error(`tenant grid: ${grid.status} ${JSON.stringify(grid.body)}`)
  // An API token, for routes that take a token id.
  const apiToken = await owner.post(`/api/orgs/${slug}/api-tokens`, { name: `${prefix} token`, scope: 'read' })
  if (apiToken.status !== 201) throw new Error(`tenant api token: ${apiToken.status} ${JSON.stringify(apiToken.body)}`)
  // A report of a reviewed survey (a second survey of the site), for routes that take a report id.
  const reviewedId = await reviewedSurvey(owner, members.thermographer, slug, { thermographerId: memberIds.thermographer, instrumentId: instrument.body.id, siteIds: [site.body.id] })
  const requested = await owner.post(`/api/orgs/${slug}/surveys/${reviewedId}/reports`, { includeImages: false })
  if (requested.status !== 202) throw new Error(`tenant report: ${requested.status} ${JSON.stringify(requested.body)}`)
  await waitForReport(owner, slug, requested.body.id)
  // A work order raised from that finding, worked to awaiting verification (for routes that take a work order or
  // verification id), with a repair photo on it.
  const wo = await owner.post(`/api/orgs/${slug}/work-orders`, { findingIds: [finding.body.id], assigneeIds: [memberIds.crew] })
  if (wo.status !== 201) throw new Error(`tenant work order: ${wo.status} ${JSON.stringify(wo.body)}`)
  let woVersion = wo.body.version as number
  for (const to of ['planned', 'in_repair', 'awaiting_verification']) {
    const moved = await members.crew.post(`/api/orgs/${slug}/work-orders/${wo.body.id}/move`, { to, version: woVersion, thermographerId: memberIds.thermographer })
    if (moved.status !== 200) throw new Error(`tenant work order move: ${moved.status} ${JSON.stringify(moved.body)}`)
    woVersion = moved.body.version
  }
  const verification = (await owner.get(`/api/orgs/${slug}/work-orders/${wo.body.id}`)).body.verifications[0]
  const photo = await uploadImage(members.crew, `/api/orgs/${slug}/work-orders/${wo.body.id}/attachments`, await pngBytes(), { kind: 'repair' })
  if (photo.complete?.status !== 200) throw new Error(`tenant repair photo: ${photo.begin.status} ${JSON.stringify(photo.complete?.body ?? photo.begin.body)}`)
  return { owner, slug, ownerId, invitationId: inv.body.id, members, memberIds, siteId: site.body.id, assetId: asset.body.id, registerImportId: upload.body.id, instrumentId: instrument.body.id, surfaceId: surface.body.id, routeId: route.body.id, surveyId: survey.body.id, findingId: finding.body.id, attachmentId: image.complete.body.id, gridId: grid.body.id, apiTokenId: apiToken.body.token.id, reportId: requested.body.id, workOrderId: wo.body.id, workOrderAttachmentId: photo.complete.body.id, verificationId: verification.id }
}

function fill(route: OrgRoute, slug: string, t: Tenant) {
  const registerIds: Record<string, string> = { site: t.siteId, asset: t.assetId, registerImport: t.registerImportId, instrument: t.instrumentId, surface: t.surfaceId, route: t.routeId, survey: t.surveyId, finding: t.findingId, findingAttachment: `${t.findingId}/attachments/${t.attachmentId}`, grid: t.gridId, apiToken: t.apiTokenId, report: t.reportId, workOrder: t.workOrderId, workOrderAttachment: `${t.workOrderId}/attachments/${t.workOrderAttachmentId}`, verification: t.verificationId }
  const id = route.idKind === 'member' ? t.memberIds.viewer : route.idKind === 'invitation' ? t.invitationId : registerIds[route.idKind ?? ''] ?? ''
  return route.path.replace(':org', slug).replace(':id', id)
}

beforeAll(async () => {
  await resetDatabase()
  a = await tenant('alpha')
  b = await tenant('beta')
}, 120_000)

describe('route list', () => {
  it('names every organisation-scoped route file', () => {
    const base = path.join(ROOT, 'server/api')
    const files: string[] = []
    const walk = (dir: string) => {
      for (const f of readdirSync(dir)) {
        const p = path.join(dir, f)
        if (statSync(p).isDirectory()) walk(p)
        else files.push(path.relative(base, p))
      }
    }
    walk(path.join(base, 'orgs/[org]'))
    expect(files.sort()).toEqual(ORG_ROUTES.map((r) => r.file).sort())
  })
})

describe('cross-tenant isolation', () => {
  it.each(ORG_ROUTES.map((r) => [`${r.method} ${r.path}`, r] as const))('%s: every role of another organisation gets 403 or 404, never data', async (_, route) => {
    for (const role of ROLES) {
      const res = await b.members[role].request(route.method, fill(route, a.slug, a), route.body)
      expect([403, 404], `${role} of beta → ${res.status} ${JSON.stringify(res.body)}`).toContain(res.status)
      // Nothing of alpha's may come back: no member e-mails, no organisation name, no ids (the echoed URL aside).
      const { url: _echo, ...rest } = (res.body ?? {}) as Record<string, unknown>
      expect(JSON.stringify(rest)).not.toMatch(/alpha-[a-z]+@tenancy\.test|alpha Utility|[0-9a-f]{8}-[0-9a-f]{4}-/)
    }
  })

  it.each(ORG_ROUTES.filter((r) => r.idKind).map((r) => [`${r.method} ${r.path}`, r] as const))('%s: an id of another organisation under one\'s own path is not found', async (_, route) => {
    const res = await b.owner.request(route.method, fill(route, b.slug, a), route.body)
    expect(res.status).toBe(404)
  })

  it('leaves the other organisation untouched', async () => {
    const org = await a.owner.get(`/api/orgs/${a.slug}`)
    expect(org.body.name).toBe('alpha Utility')
    const members = await a.owner.get(`/api/orgs/${a.slug}/members`)
    expect(members.body).toHaveLength(ROLES.length)
    const invitations = await a.owner.get(`/api/orgs/${a.slug}/invitations`)
    expect(invitations.body.map((i: { email: string }) => i.email)).toEqual(['alpha-pending@tenancy.test'])
  })

  it('answers 401 to a request without a session', async () => {
    for (const route of ORG_ROUTES) {
      const res = await new ApiClient().request(route.method, fill(route, a.slug, a), route.body)
      expect(res.status, `${route.method} ${route.path}`).toBe(401)
    }
  })
})

describe('roles', () => {
  it.each(ORG_ROUTES.map((r) => [`${r.method} ${r.path}`, r] as const))('%s refuses the roles the matrix does not allow', async (_, route) => {
    for (const role of ROLES.filter((r) => !can(r, route.permission))) {
      const res = await b.members[role].request(route.method, fill(route, b.slug, b), route.body)
      expect(res.status, `${role} → ${res.status}`).toBe(403)
      expect(res.body.data.message).toMatch(/does not allow/)
    }
  })

  it.each(ORG_ROUTES.filter((r) => r.method === 'GET').map((r) => [`${r.method} ${r.path}`, r] as const))('%s answers the roles the matrix allows', async (_, route) => {
    for (const role of ROLES.filter((r) => can(r, route.permission))) {
      const res = await b.members[role].request(route.method, fill(route, b.slug, b))
      expect(res.status, `${role} → ${res.status}`).toBe(200)
    }
  })
})
