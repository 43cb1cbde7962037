import type { Permission } from '../../shared/permissions'

/**
 * Every organisation-scoped API route, with the permission it needs. The cross-tenant and role tests walk this list,
 * and a completeness test fails when a file under server/api/orgs/[org] is missing from it: add new routes here.
 */
export interface OrgRoute {
  file: string
  method: 'GET' | 'POST' | 'PATCH' | 'DELETE'
  /** Path with :org and optional :id placeholders (:id is filled with an id that belongs to the target org). */
  path: string
  permission: Permission
  body?: Record<string, unknown>
  idKind?: 'member' | 'invitation' | 'site' | 'asset' | 'registerImport' | 'instrument' | 'surface' | 'route' | 'survey'
}

export const ORG_ROUTES: OrgRoute[] = [
  { file: 'orgs/[org]/index.get.ts', method: 'GET', path: '/api/orgs/:org', permission: 'organisation.view' },
  { file: 'orgs/[org]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org', permission: 'organisation.manage', body: { name: 'Renamed by intruder', version: 1 } },
  { file: 'orgs/[org]/members/index.get.ts', method: 'GET', path: '/api/orgs/:org/members', permission: 'members.view' },
  { file: 'orgs/[org]/members/[id].patch.ts', method: 'PATCH', path: '/api/orgs/:org/members/:id', permission: 'members.manage', body: { role: 'viewer' }, idKind: 'member' },
  { file: 'orgs/[org]/members/[id].delete.ts', method: 'DELETE', path: '/api/orgs/:org/members/:id', permission: 'members.manage', idKind: 'member' },
  { file: 'orgs/[org]/invitations/index.get.ts', method: 'GET', path: '/api/orgs/:org/invitations', permission: 'members.manage' },
  { file: 'orgs/[org]/invitations/index.post.ts', method: 'POST', path: '/api/orgs/:org/invitations', permission: 'members.manage', body: { email: 'intruder-invite@tenancy.test', role: 'owner' } },
  { file: 'orgs/[org]/invitations/[id]/resend.post.ts', method: 'POST', path: '/api/orgs/:org/invitations/:id/resend', permission: 'members.manage', idKind: 'invitation' },
  { file: 'orgs/[org]/invitations/[id]/index.delete.ts', method: 'DELETE', path: '/api/orgs/:org/invitations/:id', permission: 'members.manage', idKind: 'invitation' },
  { file: 'orgs/[org]/billing/index.get.ts', method: 'GET', path: '/api/orgs/:org/billing', permission: 'billing.manage' },
  { file: 'orgs/[org]/billing/standing.get.ts', method: 'GET', path: '/api/orgs/:org/billing/standing', permission: 'organisation.view' },
  { file: 'orgs/[org]/billing/invoices.get.ts', method: 'GET', path: '/api/orgs/:org/billing/invoices', permission: 'billing.manage' },
  { file: 'orgs/[org]/billing/checkout.post.ts', method: 'POST', path: '/api/orgs/:org/billing/checkout', permission: 'billing.manage', body: { plan: 'programme', interval: 'month', seats: 3 } },
  { file: 'orgs/[org]/billing/portal.post.ts', method: 'POST', path: '/api/orgs/:org/billing/portal', permission: 'billing.manage' },
  { file: 'orgs/[org]/billing/seats.post.ts', method: 'POST', path: '/api/orgs/:org/billing/seats', permission: 'billing.manage', body: { seats: 12 } },
  { file: 'orgs/[org]/billing/cancel.post.ts', method: 'POST', path: '/api/orgs/:org/billing/cancel', permission: 'billing.manage' },
  // Asset register (sites, assets, CSV import and export).
  { file: 'orgs/[org]/sites/index.get.ts', method: 'GET', path: '/api/orgs/:org/sites', permission: 'register.view' },
  { file: 'orgs/[org]/sites/index.post.ts', method: 'POST', path: '/api/orgs/:org/sites', permission: 'register.edit', body: { code: 'INTRUDER-1', name: 'Intruder site', kind: 'substation', latitude: 1, longitude: 1 } },
  { file: 'orgs/[org]/sites/export.get.ts', method: 'GET', path: '/api/orgs/:org/sites/export', permission: 'register.view' },
  { file: 'orgs/[org]/sites/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/sites/:id', permission: 'register.view', idKind: 'site' },
  { file: 'orgs/[org]/sites/[id]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org/sites/:id', permission: 'register.edit', body: { name: 'Renamed by intruder', version: 1 }, idKind: 'site' },
  { file: 'orgs/[org]/sites/[id]/archive.post.ts', method: 'POST', path: '/api/orgs/:org/sites/:id/archive', permission: 'register.edit', body: { version: 1 }, idKind: 'site' },
  { file: 'orgs/[org]/sites/[id]/unarchive.post.ts', method: 'POST', path: '/api/orgs/:org/sites/:id/unarchive', permission: 'register.edit', body: { version: 1 }, idKind: 'site' },
  { file: 'orgs/[org]/assets/index.get.ts', method: 'GET', path: '/api/orgs/:org/assets', permission: 'register.view' },
  { file: 'orgs/[org]/assets/index.post.ts', method: 'POST', path: '/api/orgs/:org/assets', permission: 'register.edit', body: { siteId: '00000000-0000-4000-8000-000000000000', label: 'Intruder', assetClass: 'breaker' } },
  { file: 'orgs/[org]/assets/export.get.ts', method: 'GET', path: '/api/orgs/:org/assets/export', permission: 'register.view' },
  { file: 'orgs/[org]/assets/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/assets/:id', permission: 'register.view', idKind: 'asset' },
  { file: 'orgs/[org]/assets/[id]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org/assets/:id', permission: 'register.edit', body: { label: 'Renamed by intruder', version: 1 }, idKind: 'asset' },
  { file: 'orgs/[org]/assets/[id]/archive.post.ts', method: 'POST', path: '/api/orgs/:org/assets/:id/archive', permission: 'register.edit', body: { version: 1 }, idKind: 'asset' },
  { file: 'orgs/[org]/assets/[id]/unarchive.post.ts', method: 'POST', path: '/api/orgs/:org/assets/:id/unarchive', permission: 'register.edit', body: { version: 1 }, idKind: 'asset' },
  { file: 'orgs/[org]/register-imports/index.post.ts', method: 'POST', path: '/api/orgs/:org/register-imports', permission: 'register.edit', body: { kind: 'sites', fileName: 'intruder.csv', totalChars: 10 } },
  { file: 'orgs/[org]/register-imports/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/register-imports/:id', permission: 'register.edit', idKind: 'registerImport' },
  { file: 'orgs/[org]/register-imports/[id]/problems.get.ts', method: 'GET', path: '/api/orgs/:org/register-imports/:id/problems', permission: 'register.edit', idKind: 'registerImport' },
  { file: 'orgs/[org]/register-imports/[id]/chunks.post.ts', method: 'POST', path: '/api/orgs/:org/register-imports/:id/chunks', permission: 'register.edit', body: { seq: 0, text: 'code,name\n' }, idKind: 'registerImport' },
  { file: 'orgs/[org]/register-imports/[id]/check.post.ts', method: 'POST', path: '/api/orgs/:org/register-imports/:id/check', permission: 'register.edit', idKind: 'registerImport' },
  { file: 'orgs/[org]/register-imports/[id]/commit.post.ts', method: 'POST', path: '/api/orgs/:org/register-imports/:id/commit', permission: 'register.edit', idKind: 'registerImport' },
  // Instruments, surface library, routes and the programme (due lists, map).
  { file: 'orgs/[org]/instruments/index.get.ts', method: 'GET', path: '/api/orgs/:org/instruments', permission: 'register.view' },
  { file: 'orgs/[org]/instruments/index.post.ts', method: 'POST', path: '/api/orgs/:org/instruments', permission: 'register.edit', body: { make: 'Intruder', model: 'X', serial: 'I-1', bandFromUm: 7.5, bandToUm: 14 } },
  { file: 'orgs/[org]/instruments/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/instruments/:id', permission: 'register.view', idKind: 'instrument' },
  { file: 'orgs/[org]/instruments/[id]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org/instruments/:id', permission: 'register.edit', body: { notes: 'Changed by intruder', version: 1 }, idKind: 'instrument' },
  { file: 'orgs/[org]/instruments/[id]/archive.post.ts', method: 'POST', path: '/api/orgs/:org/instruments/:id/archive', permission: 'register.edit', body: { version: 1 }, idKind: 'instrument' },
  { file: 'orgs/[org]/instruments/[id]/restore.post.ts', method: 'POST', path: '/api/orgs/:org/instruments/:id/restore', permission: 'register.edit', body: { version: 1 }, idKind: 'instrument' },
  { file: 'orgs/[org]/surfaces/index.get.ts', method: 'GET', path: '/api/orgs/:org/surfaces', permission: 'register.view' },
  { file: 'orgs/[org]/surfaces/index.post.ts', method: 'POST', path: '/api/orgs/:org/surfaces', permission: 'register.edit', body: { name: 'Intruder paint', emissivity: 0.5, method: 'contact_thermometer' } },
  { file: 'orgs/[org]/surfaces/[id]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org/surfaces/:id', permission: 'register.edit', body: { emissivity: 0.1, version: 1 }, idKind: 'surface' },
  { file: 'orgs/[org]/surfaces/[id]/archive.post.ts', method: 'POST', path: '/api/orgs/:org/surfaces/:id/archive', permission: 'register.edit', body: { version: 1 }, idKind: 'surface' },
  { file: 'orgs/[org]/routes/index.get.ts', method: 'GET', path: '/api/orgs/:org/routes', permission: 'register.view' },
  { file: 'orgs/[org]/routes/index.post.ts', method: 'POST', path: '/api/orgs/:org/routes', permission: 'routes.edit', body: { name: 'Intruder route', baseName: 'Depot', baseLatitude: 1, baseLongitude: 1, recurrenceMonths: 12 } },
  { file: 'orgs/[org]/routes/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/routes/:id', permission: 'register.view', idKind: 'route' },
  { file: 'orgs/[org]/routes/[id]/index.patch.ts', method: 'PATCH', path: '/api/orgs/:org/routes/:id', permission: 'routes.edit', body: { name: 'Renamed by intruder', version: 1 }, idKind: 'route' },
  { file: 'orgs/[org]/routes/[id]/order.post.ts', method: 'POST', path: '/api/orgs/:org/routes/:id/order', permission: 'routes.edit', body: { version: 1 }, idKind: 'route' },
  { file: 'orgs/[org]/routes/[id]/archive.post.ts', method: 'POST', path: '/api/orgs/:org/routes/:id/archive', permission: 'routes.edit', body: { version: 1 }, idKind: 'route' },
  { file: 'orgs/[org]/routes/[id]/restore.post.ts', method: 'POST', path: '/api/orgs/:org/routes/:id/restore', permission: 'routes.edit', body: { version: 1 }, idKind: 'route' },
  { file: 'orgs/[org]/programme/summary.get.ts', method: 'GET', path: '/api/orgs/:org/programme/summary', permission: 'register.view' },
  { file: 'orgs/[org]/programme/sites.get.ts', method: 'GET', path: '/api/orgs/:org/programme/sites', permission: 'register.view' },
  { file: 'orgs/[org]/programme/routes.get.ts', method: 'GET', path: '/api/orgs/:org/programme/routes', permission: 'register.view' },
  { file: 'orgs/[org]/programme/assets.get.ts', method: 'GET', path: '/api/orgs/:org/programme/assets', permission: 'register.view' },
  { file: 'orgs/[org]/programme/map.get.ts', method: 'GET', path: '/api/orgs/:org/programme/map', permission: 'register.view' },
  { file: 'orgs/[org]/programme/sites/[id].get.ts', method: 'GET', path: '/api/orgs/:org/programme/sites/:id', permission: 'register.view', idKind: 'site' },
  // Surveys, checks and findings.
  { file: 'orgs/[org]/surveys/index.get.ts', method: 'GET', path: '/api/orgs/:org/surveys', permission: 'surveys.view' },
  { file: 'orgs/[org]/surveys/index.post.ts', method: 'POST', path: '/api/orgs/:org/surveys', permission: 'surveys.plan', body: { plannedFor: '2026-12-02', thermographerId: '00000000-0000-4000-8000-000000000000', instrumentId: '00000000-0000-4000-8000-000000000000', siteIds: ['00000000-0000-4000-8000-000000000000'] } },
  { file: 'orgs/[org]/surveys/today.get.ts', method: 'GET', path: '/api/orgs/:org/surveys/today', permission: 'surveys.view' },
  { file: 'orgs/[org]/surveys/[id]/index.get.ts', method: 'GET', path: '/api/orgs/:org/surveys/:id', permission: 'surveys.view', idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/start.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/start', permission: 'surveys.run', body: { version: 1 }, idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/submit.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/submit', permission: 'surveys.run', body: { version: 1 }, idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/review.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/review', permission: 'findings.review', body: { decision: 'reviewed', version: 1 }, idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/checks.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/checks', permission: 'surveys.run', body: { assetId: '00000000-0000-4000-8000-000000000000', outcome: 'clear' }, idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/conditions.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/conditions', permission: 'surveys.run', body: { siteId: '00000000-0000-4000-8000-000000000000', ambientC: 10 }, idKind: 'survey' },
  { file: 'orgs/[org]/surveys/[id]/findings.post.ts', method: 'POST', path: '/api/orgs/:org/surveys/:id/findings', permission: 'surveys.run', body: { assetId: '00000000-0000-4000-8000-000000000000', component: 'Intruder', apparentC: 50, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'overload' }, idKind: 'survey' },
  { file: 'orgs/[org]/findings/index.get.ts', method: 'GET', path: '/api/orgs/:org/findings', permission: 'surveys.view' },
]
