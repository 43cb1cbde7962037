import { ApiClient, joinByInvitation, signUpOwner } from './api'
import { testDb } from './db'
import { rawNumber } from './fuzz'
import { pngBytes, uploadImage } from './images'
import { ORG_ROUTES } from './org-routes'

// The write routes of the bad-input test, each with whom it is called as and a body it accepts (the generated
// bodies are that body with one thing wrong). tests/e2e/input-fuzz.test.ts fails when a write route under
// server/api is in neither FUZZ_ROUTES nor NOT_FUZZED: add new routes here.

export interface FuzzFixture {
  slug: string
  orgId: string
  owner: ApiClient
  thermographer: ApiClient
  crew: ApiClient
  /** A signed-in person with an organisation of their own, for the account and organisation-creating routes. */
  person: ApiClient
  /** A signed-in person whose password the password route may change. */
  passwordPerson: ApiClient
  passwordPersonPassword: string
  ids: {
    viewer: string; thermographer: string; crew: string; invitation: string; site: string; asset: string; uncheckedAsset: string; registerImport: string
    instrument: string; surface: string; route: string; survey: string; finding: string; attachment: string; grid: string
    apiToken: string; workOrder: string; workOrderAttachment: string; verification: string
  }
  /** Ids of another organisation's rows, offered in id fields: never to be accepted. */
  otherTenantIds: string[]
}

type Ids = FuzzFixture['ids']

/** One organisation with a member per role and one of every row a write route takes an id of, through the API. */
export async function fuzzFixture(): Promise<FuzzFixture> {
  const { client: owner, slug } = await signUpOwner('Fenna Owner', 'fenna@fuzz.test', 'Fuzzwell Grid')
  const api = (p: string) => `/api/orgs/${slug}${p}`
  const must = async <T extends { status: number; body: any }>(what: string, res: Promise<T>, status = 201): Promise<T> => {
    const r = await res
    if (r.status !== status) throw new Error(`fixture ${what}: ${r.status} ${JSON.stringify(r.body)}`)
    return r
  }
  const thermo = await joinByInvitation(owner, slug, 'tova@fuzz.test', 'thermographer', 'Tova Thermographer', 'fuzz password 1')
  const crew = await joinByInvitation(owner, slug, 'cato@fuzz.test', 'crew', 'Cato Crew', 'fuzz password 1')
  const viewer = await joinByInvitation(owner, slug, 'vida@fuzz.test', 'viewer', 'Vida Viewer', 'fuzz password 1')
  const invitation = await must('invitation', owner.post(api('/invitations'), { email: 'pending@fuzz.test', role: 'viewer' }))
  const site = await must('site', owner.post(api('/sites'), { code: 'FZ-01', name: 'Fuzz Hill', kind: 'substation', latitude: 54.4, longitude: -2.9 }))
  const asset = await must('asset', owner.post(api('/assets'), { siteId: site.body.id, label: 'T1', assetClass: 'transformer' }))
  // An asset without findings, which a check may still mark clear or not reached.
  const unchecked = await must('asset 2', owner.post(api('/assets'), { siteId: site.body.id, label: 'T2', assetClass: 'transformer' }))
  const upload = await must('import', owner.post(api('/register-imports'), { kind: 'sites', fileName: 'fuzz.csv', totalChars: 20 }))
  const instrument = await must('instrument', owner.post(api('/instruments'), { make: 'Halden', model: 'T1', serial: 'FZ-1', bandFromUm: 7.5, bandToUm: 14 }))
  const surface = await must('surface', owner.post(api('/surfaces'), { name: 'Fuzz clamp', emissivity: 0.4, method: 'reference_emitter' }))
  const route = await must('route', owner.post(api('/routes'), { name: 'Fuzz round', baseName: 'Depot', baseLatitude: 54, baseLongitude: -3, recurrenceMonths: 12, siteIds: [site.body.id] }))
  const survey = await must('survey', owner.post(api('/surveys'), { plannedFor: '2026-12-02', thermographerId: thermo.id, instrumentId: instrument.body.id, siteIds: [site.body.id] }))
  await must('start', thermo.client.post(api(`/surveys/${survey.body.id}/start`), { version: survey.body.version }), 200)
  const finding = await must('finding', thermo.client.post(api(`/surveys/${survey.body.id}/findings`), {
    assetId: asset.body.id, component: 'Line-side lug', apparentC: 60, referenceC: 30, ambientC: 20, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'loose_connection',
  }))
  const image = await uploadImage(thermo.client, api(`/findings/${finding.body.id}/attachments`), await pngBytes())
  if (image.complete?.status !== 200) throw new Error(`fixture image: ${JSON.stringify(image.complete?.body ?? image.begin.body)}`)
  const grid = await must('grid', thermo.client.post(api(`/surveys/${survey.body.id}/grids`), { assetId: asset.body.id, unit: 'C', fileName: 'fuzz.csv', csv: '20,21\n22,60\n' }))
  const token = await must('api token', owner.post(api('/api-tokens'), { name: 'Fuzz token', scope: 'read' }))
  const wo = await must('work order', owner.post(api('/work-orders'), { findingIds: [finding.body.id], assigneeIds: [crew.id] }))
  let version = wo.body.version as number
  for (const to of ['planned', 'in_repair', 'awaiting_verification']) {
    version = (await must(`move ${to}`, crew.client.post(api(`/work-orders/${wo.body.id}/move`), { to, version, thermographerId: thermo.id }), 200)).body.version
  }
  const verification = (await owner.get(api(`/work-orders/${wo.body.id}`))).body.verifications[0]
  const photo = await uploadImage(crew.client, api(`/work-orders/${wo.body.id}/attachments`), await pngBytes(), { kind: 'repair' })
  if (photo.complete?.status !== 200) throw new Error(`fixture repair photo: ${JSON.stringify(photo.complete?.body ?? photo.begin.body)}`)

  // Every edited row at version 2, so that the one small version the generator sends (1) is stale: an archive, restore
  // or review that a generated body gets right must not change the rows the other routes' examples rely on.
  await must('site v2', owner.patch(api(`/sites/${site.body.id}`), { name: 'Fuzz Hill', version: 1 }), 200)
  await must('asset v2', owner.patch(api(`/assets/${asset.body.id}`), { label: 'T1', version: 1 }), 200)
  await must('instrument v2', owner.patch(api(`/instruments/${instrument.body.id}`), { notes: 'Main imager', version: 1 }), 200)
  await must('surface v2', owner.patch(api(`/surfaces/${surface.body.id}`), { name: 'Fuzz clamp', version: 1 }), 200)
  await must('route v2', owner.patch(api(`/routes/${route.body.id}`), { name: 'Fuzz round', version: 1 }), 200)
  await must('verification v2', owner.patch(api(`/verifications/${verification.id}`), { thermographerId: thermo.id, version: verification.version }), 200)

  // Another organisation, whose ids the generated bodies offer in id fields.
  const other = await signUpOwner('Otto Other', 'otto@fuzz-other.test', 'Other Grid')
  const oApi = (p: string) => `/api/orgs/${other.slug}${p}`
  const oSite = await must('other site', other.client.post(oApi('/sites'), { code: 'OT-01', name: 'Other Hill', kind: 'substation', latitude: 50, longitude: 0 }))
  const oAsset = await must('other asset', other.client.post(oApi('/assets'), { siteId: oSite.body.id, label: 'T9', assetClass: 'transformer' }))
  const oInstrument = await must('other instrument', other.client.post(oApi('/instruments'), { make: 'Halden', model: 'T9', serial: 'OT-9', bandFromUm: 8, bandToUm: 14 }))

  const person = await signUpOwner('Pia Person', 'pia@fuzz.test', 'Pia Consulting')
  const passwordPersonPassword = 'fuzz password 2'
  const passwordPerson = await signUpOwner('Pax Person', 'pax@fuzz.test', 'Pax Consulting', passwordPersonPassword)
  const orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  return {
    slug, orgId, owner, thermographer: thermo.client, crew: crew.client, person: person.client, passwordPerson: passwordPerson.client, passwordPersonPassword,
    ids: {
      viewer: viewer.id, thermographer: thermo.id, crew: crew.id, invitation: invitation.body.id, site: site.body.id, asset: asset.body.id, uncheckedAsset: unchecked.body.id,
      registerImport: upload.body.id, instrument: instrument.body.id, surface: surface.body.id, route: route.body.id, survey: survey.body.id,
      finding: finding.body.id, attachment: image.complete.body.id, grid: grid.body.id, apiToken: token.body.token.id, workOrder: wo.body.id,
      workOrderAttachment: photo.complete.body.id, verification: verification.id,
    },
    otherTenantIds: [oSite.body.id, oAsset.body.id, oInstrument.body.id, other.userId],
  }
}

export interface FuzzRoute {
  /** Whom the route is called as (default: the owner). */
  as?: (f: FuzzFixture) => ApiClient
  /** The path with real ids (default: the route's path in tests/support/org-routes.ts, ids from the fixture). */
  path?: (f: FuzzFixture) => string
  /** A body the route accepts, or refuses only for the state of the row (a stale version, a conflict). */
  body?: (f: FuzzFixture) => Record<string, unknown>
  /**
   * The route reads no body: junk bodies go to malformed and foreign ids only (sent to the real id, any body would
   * perform the action).
   */
  noBody?: true
  /** The route answers refusals its own way (no `data.fieldErrors`), e.g. next-auth or the webhook. */
  ownProtocol?: true
  /** Headers added to every request (e.g. a wrong webhook signature). */
  headers?: Record<string, string>
  /**
   * The route's credential (token in the path or body, signature) is made up: every request must be refused, with
   * any 4xx that carries a message.
   */
  bogusCredential?: true
  /** Why even the example is refused (a 4xx), when a route cannot be given a body it accepts without harm. */
  exampleRefused?: string
  /** An accepted body changes settings every page reads: after each, the dashboard and one's account must answer. */
  settings?: true
  /** The row whose current version replaces CURRENT_VERSION in the body just before each request. */
  versionOf?: (f: FuzzFixture) => { table: 'organisations' | 'sites' | 'assets' | 'instruments' | 'surfaces' | 'routes' | 'findings' | 'work_orders' | 'verifications'; id: string }
}

// A version no row has: a valid body is refused as changed meanwhile (409) and writes nothing; a generated one that
// happens to send the current version may be accepted, which the test allows for valid bodies.
const stale = 7777
/** Placeholder for the row's current version, put in just before sending: valid bodies of an edit are then applied. */
export const CURRENT_VERSION = '@current-version'
const current = rawNumber(CURRENT_VERSION)
const orgPath = (file: string, f: FuzzFixture): string => {
  const r = ORG_ROUTES.find((x) => x.file === file)
  if (!r) throw new Error(`${file} is not in tests/support/org-routes.ts`)
  const byKind: Record<string, string> = {
    member: f.ids.viewer, invitation: f.ids.invitation, site: f.ids.site, asset: f.ids.asset, registerImport: f.ids.registerImport,
    instrument: f.ids.instrument, surface: f.ids.surface, route: f.ids.route, survey: f.ids.survey, finding: f.ids.finding,
    findingAttachment: `${f.ids.finding}/attachments/${f.ids.attachment}`, grid: f.ids.grid, apiToken: f.ids.apiToken,
    workOrder: f.ids.workOrder, workOrderAttachment: `${f.ids.workOrder}/attachments/${f.ids.workOrderAttachment}`, verification: f.ids.verification,
  }
  return r.path.replace(':org', f.slug).replace(':id', r.idKind ? byKind[r.idKind]! : '')
}
/** The path of an organisation route, for `path` overrides. */
export const pathOf = orgPath

const thermo = (f: FuzzFixture) => f.thermographer
const finding = (f: FuzzFixture) => ({
  assetId: f.ids.asset, component: 'Line-side lug', apparentC: 61, referenceC: 30, ambientC: 20, emissivity: 0.9, reflectedC: 20,
  reflectedMethod: 'direct', probableCause: 'loose_connection', distanceM: 4, loadA: 300, ratedA: 630, windMs: 1, notes: 'Fuzzed',
})

/** Write routes under server/api (path relative to it) → how the bad-input test calls them. */
export const FUZZ_ROUTES: Record<string, FuzzRoute> = {
  // Account and sign-up (not organisation-scoped).
  'account/me.patch.ts': { settings: true, as: (f) => f.person, path: () => '/api/account/me', body: () => ({ name: 'Pia Person', temperatureUnit: 'C', lengthUnit: 'm', timeZone: 'Europe/London' }) },
  'account/password.post.ts': {
    as: (f) => f.passwordPerson, path: () => '/api/account/password',
    exampleRefused: 'the current password is wrong on purpose: a generated body that changed the password would end the session',
    body: () => ({ currentPassword: 'not the current password', newPassword: 'fuzz password 3' }) },
  'account/password-reset.post.ts': { as: () => new ApiClient(), path: () => '/api/account/password-reset', body: () => ({ email: 'nobody@fuzz.test' }) },
  'account/password-reset/confirm.post.ts': { as: () => new ApiClient(), bogusCredential: true, path: () => '/api/account/password-reset/confirm', body: () => ({ token: 'a'.repeat(43), password: 'fuzz password 4' }) },
  'account/sign-up.post.ts': { as: () => new ApiClient(), path: () => '/api/account/sign-up', body: () => ({ name: 'Sol Signup', email: 'sol@fuzz.test', password: 'fuzz password 5', organisationName: 'Sol Grid' }) },
  'invitations/[token]/accept.post.ts': { as: (f) => f.person, path: () => `/api/invitations/${'b'.repeat(43)}/accept`, noBody: true },
  'notices/unsubscribe.post.ts': { as: () => new ApiClient(), bogusCredential: true, path: () => `/api/notices/unsubscribe?token=${'c'.repeat(40)}`, body: () => ({ byEmail: false }) },
  'orgs/index.post.ts': { as: (f) => f.person, path: () => '/api/orgs', body: () => ({ name: 'Pia Second Grid' }) },
  // Signature-checked: every body arrives with a wrong signature and must be refused (400) without a trace.
  'stripe/webhook.post.ts': {
    as: () => new ApiClient(), path: () => '/api/stripe/webhook', ownProtocol: true, bogusCredential: true,
    headers: { 'stripe-signature': 't=1767225600,v1=5257a869e7ecebeda32affa62cdca3fa51cad7e77a0e56ff536d0ce8e108d8bd' },
    body: () => ({ id: 'evt_fuzz', type: 'customer.subscription.updated', data: { object: { id: 'sub_fuzz', customer: 'cus_fuzz' } } }),
  },

  // The organisation, its members and invitations, billing.
  'orgs/[org]/index.patch.ts': { settings: true, versionOf: (f) => ({ table: 'organisations', id: f.orgId }), body: () => ({ name: 'Fuzzwell Grid', loadExponent: 1.6, roadFactor: 1.3, averageSpeedKmh: 60, intervalMonthsNormal: 12, intervalMonthsCondition3: 6, monitorBands: [3, 4], monitorFactor: 0.5, timeZone: 'Europe/London', version: current }) },
  'orgs/[org]/members/[id].patch.ts': { body: () => ({ role: 'viewer' }) },
  'orgs/[org]/members/[id].delete.ts': { noBody: true },
  'orgs/[org]/members/[id]/qualification.post.ts': { path: (f) => `/api/orgs/${f.slug}/members/${f.ids.thermographer}/qualification`, body: () => ({ qualification: 'Level II thermographer' }) },
  'orgs/[org]/invitations/index.post.ts': { body: () => ({ email: 'invitee@fuzz.test', role: 'viewer' }) },
  'orgs/[org]/invitations/[id]/resend.post.ts': { noBody: true },
  'orgs/[org]/invitations/[id]/index.delete.ts': { noBody: true },
  'orgs/[org]/billing/checkout.post.ts': { body: () => ({ plan: 'programme', interval: 'month', seats: 5 }) },
  'orgs/[org]/billing/seats.post.ts': { body: () => ({ seats: 12 }) },
  'orgs/[org]/billing/portal.post.ts': { noBody: true },
  'orgs/[org]/billing/cancel.post.ts': { noBody: true },
  'orgs/[org]/api-tokens/index.post.ts': { body: () => ({ name: 'Fuzz feed', scope: 'read' }) },
  'orgs/[org]/api-tokens/[id]/revoke.post.ts': { noBody: true },
  'orgs/[org]/notices/read.post.ts': { body: () => ({ ids: [crypto.randomUUID()], all: false }) },
  'orgs/[org]/notices/preferences.patch.ts': { body: () => ({ preferences: [{ kind: 'survey_due', byEmail: true }] }) },

  // The register and its import.
  'orgs/[org]/sites/index.post.ts': { body: () => ({ code: 'FZ-01', name: 'Fuzz Hill', kind: 'substation', latitude: 54.4, longitude: -2.9, voltageKv: 33, accessNotes: 'Gate code at the depot', safetyNotes: 'Escort', safetyFlags: ['permit_required'] }) },
  'orgs/[org]/sites/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'sites', id: f.ids.site }), body: () => ({ name: 'Fuzz Hill', voltageKv: 33, safetyFlags: ['permit_required'], version: current }) },
  'orgs/[org]/sites/[id]/archive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/sites/[id]/unarchive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/assets/index.post.ts': { body: (f) => ({ siteId: f.ids.site, label: 'T1', assetClass: 'transformer', manufacturer: 'Ostwerk', model: 'OT-40', voltageKv: 33, ratedCurrentA: 630, criticality: 4, condition: 2, components: ['A', 'B', 'C'], intervalMonths: 12 }) },
  'orgs/[org]/assets/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'assets', id: f.ids.asset }), body: () => ({ label: 'T1', criticality: 4, components: ['A', 'B'], version: current }) },
  'orgs/[org]/assets/[id]/archive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/assets/[id]/unarchive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/register-imports/index.post.ts': { body: () => ({ kind: 'sites', fileName: 'sites.csv', totalChars: 40 }) },
  'orgs/[org]/register-imports/[id]/chunks.post.ts': { body: () => ({ seq: 5, text: 'code,name,kind\n' }) },
  'orgs/[org]/register-imports/[id]/check.post.ts': { noBody: true },
  'orgs/[org]/register-imports/[id]/commit.post.ts': { noBody: true },

  // Instruments, surfaces, routes.
  'orgs/[org]/instruments/index.post.ts': { body: () => ({ make: 'Halden', model: 'T2', serial: 'FZ-1', bandFromUm: 7.5, bandToUm: 14, ifovMrad: 1.3, accuracyK: 2, accuracyPct: 2, calibrationDue: '2027-06-01', notes: 'Spare' }) },
  'orgs/[org]/instruments/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'instruments', id: f.ids.instrument }), body: () => ({ notes: 'Serviced', bandFromUm: 7.5, bandToUm: 14, version: current }) },
  'orgs/[org]/instruments/[id]/archive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/instruments/[id]/restore.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/surfaces/index.post.ts': { body: () => ({ name: 'Fuzz clamp', emissivity: 0.5, method: 'contact_thermometer', measuredOn: '2026-11-30', notes: 'Measured on site' }) },
  'orgs/[org]/surfaces/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'surfaces', id: f.ids.surface }), body: () => ({ emissivity: 0.45, version: current }) },
  'orgs/[org]/surfaces/[id]/archive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/routes/index.post.ts': { body: (f) => ({ name: 'Fuzz round', baseName: 'Depot', baseLatitude: 54, baseLongitude: -3, recurrenceMonths: 12, thermographerId: f.ids.thermographer, instrumentId: f.ids.instrument, notes: 'North first', siteIds: [f.ids.site] }) },
  'orgs/[org]/routes/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'routes', id: f.ids.route }), body: (f) => ({ name: 'Fuzz round', siteIds: [f.ids.site], version: current }) },
  'orgs/[org]/routes/[id]/order.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/routes/[id]/archive.post.ts': { body: () => ({ version: stale }) },
  'orgs/[org]/routes/[id]/restore.post.ts': { body: () => ({ version: stale }) },

  // Surveys in the field, findings, grids, images, reports.
  'orgs/[org]/surveys/index.post.ts': { body: (f) => ({ plannedFor: '2026-12-09', thermographerId: f.ids.thermographer, instrumentId: f.ids.instrument, siteIds: [f.ids.site] }) },
  'orgs/[org]/surveys/[id]/start.post.ts': { as: thermo, body: () => ({ version: stale }) },
  'orgs/[org]/surveys/[id]/submit.post.ts': { as: thermo, body: () => ({ version: stale }) },
  'orgs/[org]/surveys/[id]/review.post.ts': { body: () => ({ decision: 'returned', comments: 'Look at T1 again', version: stale }) },
  'orgs/[org]/surveys/[id]/checks.post.ts': { as: thermo, body: (f) => ({ assetId: f.ids.uncheckedAsset, outcome: 'not_reached', reason: 'other', note: 'Locked gate' }) },
  'orgs/[org]/surveys/[id]/conditions.post.ts': { as: thermo, body: (f) => ({ siteId: f.ids.site, ambientC: 8, windMs: 2, humidityPct: 70, sky: 'overcast', loadNotes: 'Evening peak' }) },
  'orgs/[org]/surveys/[id]/findings.post.ts': { as: thermo, body: finding },
  'orgs/[org]/surveys/[id]/grids.post.ts': { as: thermo, body: (f) => ({ assetId: f.ids.asset, unit: 'C', fileName: 'grid.csv', csv: '20,21,22\n22,60,23\n' }) },
  'orgs/[org]/surveys/[id]/reports/index.post.ts': { body: () => ({ includeImages: false }) },
  'orgs/[org]/grids/[id]/regions.post.ts': { as: thermo, body: () => ({ hot: { shape: 'box', x: 0, y: 0, w: 1, h: 1 }, reference: { shape: 'ellipse', x: 1, y: 0, w: 1, h: 2 } }) },
  'orgs/[org]/findings/[id]/index.patch.ts': { as: thermo, versionOf: (f) => ({ table: 'findings', id: f.ids.finding }), body: (f) => ({ ...finding(f), version: current }) },
  'orgs/[org]/findings/[id]/rank.post.ts': { body: () => ({ band: 2, reason: 'Load was low on the day of the survey', version: stale }) },
  'orgs/[org]/findings/[id]/attachments/index.post.ts': { as: thermo, body: () => ({ kind: 'infrared', fileName: 'IR_0001.png', contentType: 'image/png', sizeBytes: 2048 }) },
  'orgs/[org]/findings/[id]/attachments/[attachmentId]/complete.post.ts': { as: thermo, noBody: true },
  'orgs/[org]/findings/[id]/attachments/[attachmentId]/archive.post.ts': { as: thermo, noBody: true },

  // Work orders and verifications.
  'orgs/[org]/work-orders/index.post.ts': { body: (f) => ({ findingIds: [f.ids.finding], title: 'Retorque T1 lug', instructions: 'Isolate first', assigneeIds: [f.ids.crew], dueOn: '2027-01-15' }) },
  'orgs/[org]/work-orders/settings.patch.ts': { settings: true, versionOf: (f) => ({ table: 'organisations', id: f.orgId }), body: () => ({ repairDaysBand1: 1, repairDaysBand2: 30, repairDaysBand3: 90, repairDaysBand4: null, version: current }) },
  'orgs/[org]/work-orders/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'work_orders', id: f.ids.workOrder }), body: (f) => ({ title: 'Retorque T1 lug', instructions: 'Isolate first', assigneeIds: [f.ids.crew], dueOn: '2027-01-15', version: current }) },
  'orgs/[org]/work-orders/[id]/move.post.ts': { as: (f) => f.crew, body: (f) => ({ to: 'planned', thermographerId: f.ids.thermographer, note: 'Parts here', version: stale }) },
  'orgs/[org]/work-orders/[id]/work.post.ts': { as: (f) => f.crew, body: () => ({ causeFound: 'Loose bolt', parts: 'M12 bolt', workDone: 'Retorqued', timeSpentMinutes: 45, version: stale }) },
  'orgs/[org]/work-orders/[id]/defer.post.ts': { as: (f) => f.crew, body: () => ({ reason: 'Outage needed', until: '2027-03-01', version: stale }) },
  'orgs/[org]/work-orders/[id]/cancel.post.ts': { body: () => ({ reason: 'Raised twice', version: stale }) },
  'orgs/[org]/work-orders/[id]/attachments/index.post.ts': { as: (f) => f.crew, body: () => ({ kind: 'repair', fileName: 'after.jpg', contentType: 'image/jpeg', sizeBytes: 4096 }) },
  'orgs/[org]/work-orders/[id]/attachments/[attachmentId]/complete.post.ts': { as: (f) => f.crew, noBody: true },
  'orgs/[org]/verifications/[id]/index.patch.ts': { versionOf: (f) => ({ table: 'verifications', id: f.ids.verification }), body: (f) => ({ thermographerId: f.ids.thermographer, version: current }) },
  'orgs/[org]/verifications/[id]/reading.post.ts': { as: thermo, body: (f) => ({ apparentC: 24, referenceC: 22, ambientC: 20, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', instrumentId: f.ids.instrument, version: stale }) },
}

/** Write routes the bad-input test leaves out, and why. */
export const NOT_FUZZED: Record<string, string> = {
  'dev/notices/run.post.ts': 'test hook: answers 404 unless NUXT_TEST_HOOKS=1, which production never sets',
  'auth/[...].ts': 'next-auth\'s own protocol; its credentials sign-in is fuzzed separately below (no session for a fuzzed body, never 5xx)',
}
