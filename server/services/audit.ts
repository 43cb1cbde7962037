// The audit log: one call, record(), appends an entry inside the transaction that makes the change, so a change
// rolled back leaves no entry. Sign-ins and password changes are kept per person (account_events, the account page)
// and copied into the log of every organisation the person belongs to. The request's address and browser come from
// the request being served (Nitro's async request context), so callers never pass them.
import type { H3Event } from 'h3'
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import {
  ACCOUNT_ACTION_LABELS, AUDIT_ACTIONS, AUDIT_GROUPS, actionsOf, auditActionLabel, auditSummary,
  type AccountAction, type AccountEventPage, type AuditAction, type AuditEntry, type AuditGroup, type AuditListQuery,
  type AuditPage, type AuditTargetKind,
} from '#shared/audit'
import { pageWindow } from './paging'

type Db = Kysely<Database> | Transaction<Database>

const clip = (s: string | null | undefined, n: number) => (s == null ? null : s.slice(0, n))

/** Address and browser of the request being served (Nitro's request context); nulls outside a request (workers, scripts). */
export function requestOrigin(): { ip: string | null; userAgent: string | null } {
  let event: H3Event
  try {
    event = useEvent()
  } catch {
    return { ip: null, userAgent: null }
  }
  return { ip: clip(clientAddress(event), 100), userAgent: clip(getRequestHeader(event, 'user-agent') ?? null, 400) }
}

export interface AuditActor { id: string | null; label: string; tokenId?: string | null }

/** The person (or their API token) acting in a member context. */
export function actorOf(ctx: MemberContext): AuditActor {
  const label = `${ctx.user.name} <${ctx.user.email}>${ctx.token ? ` with API token “${ctx.token.name}”` : ''}`
  return { id: ctx.user.id, label, tokenId: ctx.token?.id ?? null }
}

/** The payment provider as an actor (webhooks). */
export const PAYMENT_PROVIDER: AuditActor = { id: null, label: 'Payment provider' }

export interface AuditTarget { kind: AuditTargetKind; id?: string | null; label?: string }

export type AuditRecord = {
  action: AuditAction
  target?: AuditTarget
  details?: Record<string, unknown>
} & ({ ctx: MemberContext } | { organisationId: string; actor: AuditActor | null })

/** Appends one entry to an organisation's log; call it with the transaction that makes the change. */
export async function record(db: Db, e: AuditRecord): Promise<void> {
  const organisationId = 'ctx' in e ? e.ctx.org.id : e.organisationId
  const actor = 'ctx' in e ? actorOf(e.ctx) : e.actor
  const origin = requestOrigin()
  await db.insertInto('audit_events').values({
    organisation_id: organisationId,
    actor_id: actor?.id ?? null,
    actor_label: (actor?.label ?? '').slice(0, 400),
    actor_token_id: actor?.tokenId ?? null,
    action: e.action,
    target_kind: e.target?.kind ?? '',
    target_id: clip(e.target?.id ?? null, 200),
    target_label: (e.target?.label ?? '').slice(0, 400),
    details: JSON.stringify(e.details ?? {}),
    ip: origin.ip,
    user_agent: origin.userAgent,
  }).execute()
}

/** Field-by-field differences of two objects, for `details.changes` (only keys whose value changed). */
export function changesOf<T extends Record<string, unknown>>(before: T, after: Partial<T>): Record<string, { from: unknown; to: unknown }> {
  const out: Record<string, { from: unknown; to: unknown }> = {}
  for (const [k, to] of Object.entries(after)) {
    if (to === undefined) continue
    const from = before[k]
    if (JSON.stringify(from) !== JSON.stringify(to)) out[k] = { from: from ?? null, to }
  }
  return out
}

/**
 * A person's own account event: kept on their account (account_events) and, except sign-outs, copied into the log
 * of each organisation they belong to, in one transaction. `userId` null: a refused sign-in with an unknown address
 * (kept on no organisation's log).
 */
export async function recordAccountEvent(
  db: Db,
  e: { userId: string | null; email: string; action: AccountAction },
): Promise<void> {
  // Inside the caller's transaction when there is one (a password change), else in one of its own.
  if (!db.isTransaction) return db.transaction().execute((trx) => recordAccountEvent(trx, e))
  const origin = requestOrigin()
  const email = e.email.trim().toLowerCase().slice(0, 254)
  await (async (trx: Db) => {
    await trx.insertInto('account_events').values({ user_id: e.userId, email, action: e.action, ip: origin.ip, user_agent: origin.userAgent }).execute()
    if (!e.userId || e.action === 'account.signed_out') return
    const person = await trx.selectFrom('users').select(['id', 'name', 'email']).where('id', '=', e.userId).executeTakeFirst()
    if (!person) return
    const orgs = await trx.selectFrom('memberships').select('organisation_id')
      .where('user_id', '=', e.userId).where('removed_at', 'is', null).execute()
    const label = `${person.name} <${person.email}>`
    // A refused sign-in was not made by the person whose address was typed: nobody is named as the actor.
    const actor: AuditActor | null = e.action === 'account.sign_in_failed' ? null : { id: person.id, label }
    for (const { organisation_id } of orgs) {
      await record(trx, {
        organisationId: organisation_id, actor, action: e.action,
        target: { kind: 'user', id: person.id, label }, details: e.action === 'account.sign_in_failed' ? { email } : {},
      })
    }
  })(db)
}

/** The organisation's log, newest first, filtered and paged in PostgreSQL. */
export async function listAudit(ctx: MemberContext, q: AuditListQuery): Promise<AuditPage> {
  const db = useDb()
  let base = db.selectFrom('audit_events as e').where('e.organisation_id', '=', ctx.org.id)
  if (q.kind) {
    const actions = (AUDIT_GROUPS as readonly string[]).includes(q.kind) ? actionsOf(q.kind as AuditGroup) : [q.kind]
    base = base.where('e.action', 'in', actions)
  }
  if (q.personId) {
    const personId = q.personId
    base = base.where((eb) => eb.or([
      eb('e.actor_id', '=', personId),
      eb.and([eb('e.target_kind', '=', 'user'), eb('e.target_id', '=', personId)]),
    ]))
  }
  // Days are the organisation's days (its time zone), both ends included.
  const tz = db.selectFrom('organisations').select('time_zone').where('id', '=', ctx.org.id)
  if (q.from) base = base.where('e.at', '>=', sql<Date>`(${q.from}::date)::timestamp at time zone (${tz})`)
  if (q.to) base = base.where('e.at', '<', sql<Date>`(${q.to}::date + 1)::timestamp at time zone (${tz})`)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base.leftJoin('api_tokens as t', (j) => j.onRef('t.id', '=', 'e.actor_token_id').onRef('t.organisation_id', '=', 'e.organisation_id'))
      .select(['e.id', 'e.at', 'e.action', 'e.actor_id', 'e.actor_label', 'e.actor_token_id', 't.name as token_name', 'e.target_kind', 'e.target_id',
        'e.target_label', 'e.details', 'e.ip', 'e.user_agent'])
      .orderBy('e.at', 'desc').orderBy('e.id', 'desc').limit(limit).offset(offset).execute(),
  ])
  return {
    items: rows.map((r): AuditEntry => {
      const target = r.target_kind ? { kind: r.target_kind, id: r.target_id, label: r.target_label } : null
      const details = r.details ?? {}
      return {
        id: r.id,
        at: r.at.toISOString(),
        action: r.action,
        actionLabel: auditActionLabel(r.action),
        group: (AUDIT_ACTIONS as Record<string, { group: AuditGroup }>)[r.action]?.group ?? null,
        actor: r.actor_id || r.actor_label ? { id: r.actor_id, label: r.actor_label, tokenId: r.actor_token_id, tokenName: r.token_name ?? null } : null,
        target,
        details,
        summary: auditSummary(r.action, target, details),
        ip: r.ip,
        userAgent: r.user_agent,
      }
    }),
    total: Number(count.n), page: q.page, pageSize: q.pageSize,
  }
}

/** The signed-in person's own sign-ins, sign-outs and password changes, newest first. */
export async function listAccountEvents(userId: string, page: number, pageSize: number): Promise<AccountEventPage> {
  const db = useDb()
  const base = db.selectFrom('account_events').where('user_id', '=', userId)
  const { limit, offset } = pageWindow(page, pageSize)
  const [count, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base.select(['id', 'at', 'action', 'ip', 'user_agent']).orderBy('at', 'desc').orderBy('id', 'desc').limit(limit).offset(offset).execute(),
  ])
  return {
    items: rows.map((r) => ({
      id: r.id, at: r.at.toISOString(), action: r.action,
      actionLabel: ACCOUNT_ACTION_LABELS[r.action as AccountAction] ?? r.action, ip: r.ip, userAgent: r.user_agent,
    })),
    total: Number(count.n), page, pageSize,
  }
}

/** A sign-in through the credentials form: kept for the person whose address was typed, when there is one. */
export async function recordSignIn(email: string, outcome: { userId: string } | 'refused'): Promise<void> {
  const db = useDb()
  const address = email.trim().toLowerCase().slice(0, 254)
  if (outcome !== 'refused') {
    await recordAccountEvent(db, { userId: outcome.userId, email: address, action: 'account.signed_in' })
    return
  }
  const known = address
    ? await db.selectFrom('users').select('id').where(sql`lower(email)`, '=', address).executeTakeFirst()
    : undefined
  await recordAccountEvent(db, { userId: known?.id ?? null, email: address, action: 'account.sign_in_failed' })
}

/** A sign-out (kept on the person's own account only). */
export async function recordSignOut(userId: string | null | undefined): Promise<void> {
  if (!userId) return
  const db = useDb()
  const person = await db.selectFrom('users').select('email').where('id', '=', userId).executeTakeFirst()
  if (person) await recordAccountEvent(db, { userId, email: person.email, action: 'account.signed_out' })
}
