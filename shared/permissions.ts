/** Roles a person can hold in one organisation. */
export const ROLES = ['owner', 'manager', 'thermographer', 'crew', 'viewer'] as const
export type Role = (typeof ROLES)[number]

export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  manager: 'Manager',
  thermographer: 'Thermographer',
  crew: 'Crew',
  viewer: 'Viewer',
}

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  owner: 'Billing, plan and seats, organisation settings, members and invitations; everything a manager does.',
  manager: 'Asset register, routes and schedules, criteria sets, surface library, instruments, surveys, work orders, reviews and reports.',
  thermographer: 'Runs assigned surveys in the field, records checks and findings, uploads images and temperature grids.',
  crew: 'Sees the work orders assigned to the crew, records repairs, requests verification.',
  viewer: 'Read-only access for engineering reviewers, insurers and auditors.',
}

/**
 * The permission matrix: each permission lists the roles that hold it.
 * The server checks these in requireMember(); the client uses them only to hide what a person cannot do.
 */
export const PERMISSIONS = {
  'organisation.view': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  'organisation.manage': ['owner'],
  'members.view': ['owner', 'manager'],
  'members.manage': ['owner'],
  'billing.manage': ['owner'],
  'register.view': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  'register.edit': ['owner', 'manager'],
  'workbench.use': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  // Routes and schedules are planned by managers; everyone reads them (instruments and surfaces use register.*).
  'routes.edit': ['owner', 'manager'],
  // Surveys: managers plan and review; the assigned thermographer runs them; everyone reads them.
  'surveys.view': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  'surveys.plan': ['owner', 'manager'],
  'surveys.run': ['owner', 'manager', 'thermographer'],
  'findings.review': ['owner', 'manager'],
  // The programme dashboard: the figures managers show engineers, insurers and management; read-only.
  'dashboard.view': ['owner', 'manager', 'viewer'],
  // Notices: everyone reads their own and chooses which reach them by e-mail; managers watch the outbox.
  'notices.view': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  'notices.outbox': ['owner', 'manager'],
  // Organisation API tokens: created, listed and revoked by owners; a token itself never holds this (shared/api-tokens.ts).
  'tokens.manage': ['owner'],
  // The audit log (sign-ins, role changes, billing, archives): owners only, since it shows every member's sign-in
  // addresses and the organisation's payments.
  'audit.view': ['owner'],
  // Survey reports (PDF): managers make them from reviewed surveys; the people who read results download them
  // (thermographers their work, viewers as engineering reviewers, insurers and auditors). Crews work from work orders.
  'reports.create': ['owner', 'manager'],
  'reports.view': ['owner', 'manager', 'thermographer', 'viewer'],
  // Work orders: managers raise, edit and cancel them; the crew assigned works them (owners and managers may too);
  // thermographers record the verification re-scan (managers too). Crew cannot rank or cancel; thermographers cannot raise.
  'workorders.view': ['owner', 'manager', 'thermographer', 'crew', 'viewer'],
  'workorders.raise': ['owner', 'manager'],
  'workorders.work': ['owner', 'manager', 'crew'],
  'workorders.cancel': ['owner', 'manager'],
  'verifications.record': ['owner', 'manager', 'thermographer'],
} as const satisfies Record<string, readonly Role[]>
export type Permission = keyof typeof PERMISSIONS

/** Whether a role holds a permission. */
export function can(role: Role | null | undefined, permission: Permission): boolean {
  return !!role && (PERMISSIONS[permission] as readonly Role[]).includes(role)
}
