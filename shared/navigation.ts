// The organisation navigation, as data: later screens (Sites, Assets, Routes, Surveys, Findings, Work orders,
// Reports) add a line here with the permission that shows it. List only screens that exist.
import { can, type Permission, type Role } from './permissions'

export type NavIcon = 'overview' | 'workbench' | 'members' | 'settings' | 'map' | 'route' | 'calendar' | 'instrument' | 'surface' | 'billing' | 'site' | 'asset' | 'bell' | 'mail'

export interface NavItem {
  key: string
  label: string
  /** Path inside the organisation: '' is the overview, 'members' is /orgs/<slug>/members. */
  path: string
  icon: NavIcon
  permission: Permission
}

export const ORG_NAV: readonly NavItem[] = [
  { key: 'overview', label: 'Overview', path: '', icon: 'overview', permission: 'organisation.view' },
  { key: 'dashboard', label: 'Dashboard', path: 'dashboard', icon: 'overview', permission: 'dashboard.view' },
  { key: 'workbench', label: 'Workbench', path: 'workbench', icon: 'workbench', permission: 'workbench.use' },
  { key: 'sites', label: 'Sites', path: 'sites', icon: 'site', permission: 'register.view' },
  { key: 'assets', label: 'Assets', path: 'assets', icon: 'asset', permission: 'register.view' },
  { key: 'map', label: 'Map', path: 'map', icon: 'map', permission: 'register.view' },
  { key: 'routes', label: 'Routes', path: 'routes', icon: 'route', permission: 'register.view' },
  { key: 'programme', label: 'Due', path: 'programme', icon: 'calendar', permission: 'register.view' },
  { key: 'instruments', label: 'Instruments', path: 'instruments', icon: 'instrument', permission: 'register.view' },
  { key: 'surfaces', label: 'Surfaces', path: 'surfaces', icon: 'surface', permission: 'register.view' },
  { key: 'surveys', label: 'Surveys', path: 'surveys', icon: 'calendar', permission: 'surveys.view' },
  { key: 'findings', label: 'Findings', path: 'findings', icon: 'workbench', permission: 'surveys.view' },
  { key: 'work-orders', label: 'Work orders', path: 'work-orders', icon: 'asset', permission: 'workorders.view' },
  { key: 'my-repairs', label: 'My repairs', path: 'work-orders/mine', icon: 'route', permission: 'workorders.work' },
  { key: 'verifications', label: 'Verifications', path: 'verifications', icon: 'calendar', permission: 'verifications.record' },
  { key: 'notices', label: 'Notices', path: 'notices', icon: 'bell', permission: 'notices.view' },
  { key: 'outbox', label: 'Outbox', path: 'outbox', icon: 'mail', permission: 'notices.outbox' },
  { key: 'members', label: 'Members', path: 'members', icon: 'members', permission: 'members.view' },
  { key: 'settings', label: 'Settings', path: 'settings', icon: 'settings', permission: 'organisation.manage' },
  { key: 'api-tokens', label: 'API tokens', path: 'api-tokens', icon: 'settings', permission: 'tokens.manage' },
  { key: 'billing', label: 'Billing', path: 'billing', icon: 'billing', permission: 'billing.manage' },
  { key: 'audit', label: 'Audit log', path: 'audit', icon: 'settings', permission: 'audit.view' },
]

/** The navigation entries a role may see in an organisation, with their full paths. */
export function navFor(slug: string, role: Role | null | undefined, items: readonly NavItem[] = ORG_NAV) {
  return items
    .filter((item) => can(role, item.permission))
    .map((item) => ({ ...item, to: item.path ? `/orgs/${slug}/${item.path}` : `/orgs/${slug}` }))
}
