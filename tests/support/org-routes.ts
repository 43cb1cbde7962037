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
  idKind?: 'member' | 'invitation'
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
]
