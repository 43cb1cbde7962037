// The audit log's own vocabulary: every security-relevant action Greybody records, grouped for the filter, with the
// words the page shows. Pure code, for both sides. A new action is added here (and recorded with
// server/services/audit.ts); the database only checks the `area.verb` shape, so adding one needs no migration.
import { z } from 'zod'
import { isoDateSchema, pageSchema, pageSizeSchema } from './schemas/common'

export const AUDIT_GROUPS = ['sign_in', 'account', 'members', 'settings', 'billing', 'tokens', 'records'] as const
export type AuditGroup = (typeof AUDIT_GROUPS)[number]

export const AUDIT_GROUP_LABELS: Record<AuditGroup, string> = {
  sign_in: 'Sign-ins',
  account: 'Passwords',
  members: 'Members and invitations',
  settings: 'Organisation settings',
  billing: 'Billing',
  tokens: 'API tokens',
  records: 'Archives, cancellations and imports',
}

/** Every action, its group and its label. The key is stored in `audit_events.action`. */
export const AUDIT_ACTIONS = {
  'account.signed_in': { group: 'sign_in', label: 'Signed in' },
  'account.sign_in_failed': { group: 'sign_in', label: 'Sign-in refused (wrong e-mail or password)' },
  'account.password_changed': { group: 'account', label: 'Password changed' },
  'account.password_reset': { group: 'account', label: 'Password reset from an e-mailed link' },
  'member.invited': { group: 'members', label: 'Invitation sent' },
  'member.invitation_resent': { group: 'members', label: 'Invitation sent again' },
  'member.invitation_revoked': { group: 'members', label: 'Invitation withdrawn' },
  'member.joined': { group: 'members', label: 'Joined by invitation' },
  'member.role_changed': { group: 'members', label: 'Role changed' },
  'member.removed': { group: 'members', label: 'Member removed' },
  'organisation.settings_changed': { group: 'settings', label: 'Settings changed' },
  'organisation.repair_deadlines_changed': { group: 'settings', label: 'Repair deadlines changed' },
  'billing.checkout_started': { group: 'billing', label: 'Checkout opened' },
  'billing.portal_opened': { group: 'billing', label: 'Billing portal opened' },
  'billing.seats_changed': { group: 'billing', label: 'Seats changed' },
  'billing.cancel_requested': { group: 'billing', label: 'Cancellation at period end' },
  'billing.subscription_changed': { group: 'billing', label: 'Subscription changed' },
  'billing.invoice_paid': { group: 'billing', label: 'Invoice paid' },
  'billing.invoice_payment_failed': { group: 'billing', label: 'Invoice payment failed' },
  'token.created': { group: 'tokens', label: 'API token created' },
  'token.revoked': { group: 'tokens', label: 'API token revoked' },
  'site.archived': { group: 'records', label: 'Site archived' },
  'site.restored': { group: 'records', label: 'Site restored' },
  'asset.archived': { group: 'records', label: 'Asset archived' },
  'asset.restored': { group: 'records', label: 'Asset restored' },
  'instrument.archived': { group: 'records', label: 'Instrument archived' },
  'instrument.restored': { group: 'records', label: 'Instrument restored' },
  'route.archived': { group: 'records', label: 'Route archived' },
  'route.restored': { group: 'records', label: 'Route restored' },
  'surface.archived': { group: 'records', label: 'Measured surface archived' },
  'work_order.cancelled': { group: 'records', label: 'Work order cancelled' },
  'image.removed': { group: 'records', label: 'Image taken off a finding' },
  'register.import_committed': { group: 'records', label: 'Register import written' },
} as const satisfies Record<string, { group: AuditGroup; label: string }>
export type AuditAction = keyof typeof AUDIT_ACTIONS
export const AUDIT_ACTION_KEYS = Object.keys(AUDIT_ACTIONS) as AuditAction[]

/** Actions that concern a person's own account: kept per person and copied into each of their organisations. */
export const ACCOUNT_ACTIONS = ['account.signed_in', 'account.sign_in_failed', 'account.password_changed', 'account.password_reset'] as const
export type AccountAction = (typeof ACCOUNT_ACTIONS)[number] | 'account.signed_out'

export const ACCOUNT_ACTION_LABELS: Record<AccountAction, string> = {
  'account.signed_in': 'Signed in',
  'account.sign_in_failed': 'Sign-in refused (wrong password)',
  'account.signed_out': 'Signed out',
  'account.password_changed': 'Password changed',
  'account.password_reset': 'Password reset from an e-mailed link',
}

/** What kind of record an entry is about. */
export const AUDIT_TARGET_KINDS = ['user', 'invitation', 'organisation', 'subscription', 'invoice', 'api_token', 'site', 'asset', 'instrument', 'route', 'surface', 'work_order', 'attachment', 'register_import'] as const
export type AuditTargetKind = (typeof AUDIT_TARGET_KINDS)[number]

/** The actions of a group. */
export function actionsOf(group: AuditGroup): AuditAction[] {
  return AUDIT_ACTION_KEYS.filter((a) => AUDIT_ACTIONS[a].group === group)
}

/** The label of a stored action, or the key itself for one this version does not know. */
export function auditActionLabel(action: string): string {
  return (AUDIT_ACTIONS as Record<string, { label: string }>)[action]?.label ?? action
}

/** The audit list's query: filter by group or action, person (as actor or as subject), and day range. */
export const auditListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  // One group (`members`) or one action (`member.role_changed`); absent = everything.
  kind: z.enum([...AUDIT_GROUPS, ...AUDIT_ACTION_KEYS] as [string, ...string[]], { error: 'Not a kind of entry.' }).optional(),
  personId: z.uuid({ error: 'Not a person of this organisation.' }).optional(),
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
}).refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end date must not be before the start date.' })
export type AuditListQuery = z.output<typeof auditListQuerySchema>

/** The person's own account history (account page). */
export const accountEventsQuerySchema = z.object({ page: pageSchema, pageSize: pageSizeSchema })

export interface AuditEntry {
  id: string
  at: string
  action: string
  actionLabel: string
  group: AuditGroup | null
  actor: { id: string | null; label: string; tokenId: string | null; tokenName: string | null } | null
  target: { kind: string; id: string | null; label: string } | null
  details: Record<string, unknown>
  /** One sentence in our words, made from the details. */
  summary: string
  ip: string | null
  userAgent: string | null
}

export interface AuditPage { items: AuditEntry[]; total: number; page: number; pageSize: number }

export interface AccountEventEntry { id: string; at: string; action: string; actionLabel: string; ip: string | null; userAgent: string | null }
export interface AccountEventPage { items: AccountEventEntry[]; total: number; page: number; pageSize: number }

const word = (v: unknown) => (v === null || v === undefined || v === '' ? '—' : String(v))
// Amounts are stored in minor units (cents), as everywhere in billing.
const money = (amount: unknown, currency: unknown) =>
  typeof amount === 'number' ? `${(amount / 100).toFixed(2)} ${String(currency ?? '').toUpperCase()}` : '—'

/** One sentence per entry for the log, in our own words, from its details. */
export function auditSummary(action: string, target: { label: string } | null, d: Record<string, unknown>): string {
  const t = target?.label ?? ''
  switch (action) {
    case 'account.signed_in': return `${t} signed in.`
    case 'account.sign_in_failed': return `A sign-in as ${word(d.email)} was refused.`
    case 'account.password_changed': return `${t} changed their password; their other sessions ended.`
    case 'account.password_reset': return `${t} set a new password from a reset link; their other sessions ended.`
    case 'member.invited': return `Invited ${t} as ${word(d.role)}.`
    case 'member.invitation_resent': return `Sent the invitation to ${t} again.`
    case 'member.invitation_revoked': return `Withdrew the invitation to ${t}.`
    case 'member.joined': return `${t} joined as ${word(d.role)}.`
    case 'member.role_changed': return `Changed ${t} from ${word(d.from)} to ${word(d.to)}.`
    case 'member.removed': return `Removed ${t} (was ${word(d.role)}).`
    case 'organisation.settings_changed':
    case 'organisation.repair_deadlines_changed': {
      const changes = (d.changes ?? {}) as Record<string, { from: unknown; to: unknown }>
      const parts = Object.entries(changes).map(([k, v]) => `${k} ${word(v.from)} → ${word(v.to)}`)
      return parts.length ? `Changed ${parts.join(', ')}.` : 'Saved the settings unchanged.'
    }
    case 'billing.checkout_started': return `Opened checkout for ${word(d.plan)} (${word(d.interval)}ly, ${word(d.seats)} seats).`
    case 'billing.portal_opened': return 'Opened the billing portal.'
    case 'billing.seats_changed': return `Seats ${word(d.from)} → ${word(d.to)}.`
    case 'billing.cancel_requested': return 'Asked to cancel at the end of the paid period.'
    case 'billing.subscription_changed': {
      const changes = (d.changes ?? {}) as Record<string, { from: unknown; to: unknown }>
      return `Subscription: ${Object.entries(changes).map(([k, v]) => `${k} ${word(v.from)} → ${word(v.to)}`).join(', ')}.`
    }
    case 'billing.invoice_paid': return `Invoice ${t} paid (${money(d.amount, d.currency)}).`
    case 'billing.invoice_payment_failed': return `Payment of invoice ${t} failed (${money(d.amount, d.currency)} due).`
    case 'token.created': return `Created the API token ${t} (${word(d.scope)}).`
    case 'token.revoked': return `Revoked the API token ${t}.`
    case 'site.archived': return `Archived site ${t}${d.assets ? ` and its ${word(d.assets)} asset(s)` : ''}.`
    case 'work_order.cancelled': return `Cancelled ${t}: ${word(d.reason)}`
    case 'register.import_committed': return `Wrote ${word(d.rows)} ${word(d.kind)} from ${t}.`
    default: return `${auditActionLabel(action)}${t ? `: ${t}` : ''}.`
  }
}
