import { sql, type Kysely, type Transaction, type UpdateObject } from 'kysely'
import type { Database } from '~~/db/database'
import type { Invitation } from '~~/db/tables/invitations'
import type { Role } from '#shared/permissions'
import { ROLE_LABELS } from '#shared/permissions'
import { invitationEmail } from './emails'
import { assertSeatFor } from './billing'
import { record } from './audit'

export const INVITATION_DAYS = 7

export interface InvitationView {
  id: string
  email: string
  role: Role
  status: 'pending' | 'accepted' | 'revoked'
  expiresAt: Date
  expired: boolean
  sentCount: number
  lastSentAt: Date
  createdAt: Date
}

type InvitationRow = Pick<Invitation, 'id' | 'email' | 'role' | 'status' | 'expires_at' | 'sent_count' | 'last_sent_at' | 'created_at'>

/** Row → API object. */
export function toInvitationView(r: InvitationRow): InvitationView {
  return {
    id: r.id, email: r.email, role: r.role, status: r.status, expiresAt: r.expires_at,
    expired: new Date(r.expires_at).getTime() < Date.now(), sentCount: r.sent_count, lastSentAt: r.last_sent_at, createdAt: r.created_at,
  }
}

const columns = ['id', 'email', 'role', 'status', 'expires_at', 'sent_count', 'last_sent_at', 'created_at'] as const

async function mail(orgName: string, inviterName: string, role: Role, email: string, token: string, expiresAt: Date) {
  const content = invitationEmail({ orgName, inviterName, role: ROLE_LABELS[role].toLowerCase(), url: appLink(`/invitations/${token}`), expiresAt })
  await sendMail({ to: email, ...content })
}

/** Invites an address with a role; refuses existing members and a second pending invitation. */
export async function createInvitation(ctx: MemberContext, email: string, role: Role): Promise<InvitationView> {
  const db = useDb()
  const existing = await db
    .selectFrom('memberships as m')
    .innerJoin('users as u', 'u.id', 'm.user_id')
    .select('m.user_id')
    .where('m.organisation_id', '=', ctx.org.id)
    .where('m.removed_at', 'is', null)
    .where(sql`lower(u.email)`, '=', email)
    .executeTakeFirst()
  if (existing) fieldError('email', `${email} is already a member of ${ctx.org.name}.`, 409)
  const { token, hash } = newToken()
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 86400_000)
  // A pending invitation for an editing role holds a seat: inserted, then counted under the billing row's lock,
  // so two invitations cannot take the last seat; a refusal rolls the insert back.
  const row = await db.transaction().execute(async (trx) => {
    const inserted = await trx
      .insertInto('invitations')
      .values({ organisation_id: ctx.org.id, email, role, token_hash: hash, invited_by: ctx.user.id, expires_at: expiresAt })
      .onConflict((oc) => oc.expression(sql`organisation_id, lower(email)`).where('status', '=', 'pending').doNothing())
      .returning(columns)
      .executeTakeFirst()
    if (inserted) {
      await assertSeatFor(trx, ctx.org, role, ctx.member.role, { adding: 0 })
      await record(trx, { ctx, action: 'member.invited', target: { kind: 'invitation', id: inserted.id, label: email }, details: { role } })
    }
    return inserted
  })
  if (!row) fieldError('email', `${email} already has a pending invitation. Resend it from the list instead.`, 409)
  await mail(ctx.org.name, ctx.user.name, role, email, token, expiresAt)
  return toInvitationView(row)
}

/** Changes a still-pending invitation and records it in the audit log, in one transaction; 404 when none is pending. */
async function changePendingInvitation(
  ctx: MemberContext,
  id: string,
  action: 'member.invitation_resent' | 'member.invitation_revoked',
  set: UpdateObject<Database, 'invitations'>,
) {
  const row = await useDb().transaction().execute(async (trx) => {
    const updated = await trx.updateTable('invitations').set(set)
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('status', '=', 'pending')
      .returning(columns).executeTakeFirst()
    if (updated) {
      await record(trx, { ctx, action, target: { kind: 'invitation', id: updated.id, label: updated.email }, details: { role: updated.role } })
    }
    return updated
  })
  if (!row) throw notFound('Pending invitation')
  return row
}

/** Sends a pending invitation again with a fresh link and a fresh expiry; the old link stops working. */
export async function resendInvitation(ctx: MemberContext, id: string): Promise<InvitationView> {
  const { token, hash } = newToken()
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 86400_000)
  const row = await changePendingInvitation(ctx, id, 'member.invitation_resent',
    { token_hash: hash, expires_at: expiresAt, last_sent_at: new Date(), sent_count: sql`sent_count + 1` })
  await mail(ctx.org.name, ctx.user.name, row.role, row.email, token, expiresAt)
  return toInvitationView(row)
}

/** Withdraws a pending invitation; its link then answers that it was withdrawn. */
export async function revokeInvitation(ctx: MemberContext, id: string): Promise<InvitationView> {
  const row = await changePendingInvitation(ctx, id, 'member.invitation_revoked', { status: 'revoked', revoked_at: new Date() })
  return toInvitationView(row)
}

/** Looks up an invitation by its link token, with a clear error for every way a link can be unusable. */
export async function usableInvitation(db: Transaction<Database> | Kysely<Database>, token: string, lock = false) {
  let q = db
    .selectFrom('invitations as i')
    .innerJoin('organisations as o', 'o.id', 'i.organisation_id')
    .select(['i.id', 'i.email', 'i.role', 'i.status', 'i.expires_at', 'i.organisation_id', 'o.name as org_name', 'o.slug as org_slug'])
    .where('i.token_hash', '=', hashToken(token))
  if (lock) q = q.forUpdate()
  const inv = await q.executeTakeFirst()
  const gone = (message: string) => createError({ statusCode: 410, statusMessage: 'Invitation unusable', data: { message } })
  if (!inv) throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'This invitation link is not valid. It may have been replaced by a newer e-mail: use the most recent one, or ask for a new invitation.' } })
  if (inv.status === 'revoked') throw gone(`This invitation to ${inv.org_name} was withdrawn. Ask one of its owners for a new one.`)
  if (inv.status === 'accepted') throw gone(`This invitation to ${inv.org_name} has already been used. Sign in to open the organisation.`)
  if (new Date(inv.expires_at).getTime() < Date.now()) {
    throw gone(`This invitation to ${inv.org_name} expired on ${new Date(inv.expires_at).toUTCString()}. Ask one of its owners to send it again.`)
  }
  return inv
}

/** Adds the user to the invitation's organisation with its role, inside the caller's transaction. */
export async function acceptInvitation(trx: Transaction<Database>, token: string, user: { id: string; email: string }) {
  const inv = await usableInvitation(trx, token, true)
  if (inv.email.toLowerCase() !== user.email.toLowerCase()) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Wrong account',
      data: { message: `This invitation was sent to ${inv.email}, but you are signed in as ${user.email}. Sign out and use ${inv.email}.` },
    })
  }
  const active = await trx.selectFrom('memberships').select('role')
    .where('organisation_id', '=', inv.organisation_id).where('user_id', '=', user.id).where('removed_at', 'is', null)
    .executeTakeFirst()
  if (!active) {
    // Joining with an editing role needs a free seat (the owners may have reduced seats since inviting).
    await assertSeatFor(trx, { id: inv.organisation_id, name: inv.org_name }, inv.role, null, { countPending: false })
    await trx.insertInto('memberships')
      .values({ organisation_id: inv.organisation_id, user_id: user.id, role: inv.role, removed_at: null })
      .onConflict((oc) => oc.columns(['organisation_id', 'user_id']).doUpdateSet({
        role: inv.role, removed_at: null, updated_at: new Date(), version: sql`memberships.version + 1`,
      }))
      .execute()
  }
  await trx.updateTable('invitations')
    .set({ status: 'accepted', accepted_at: new Date(), accepted_by: user.id })
    .where('id', '=', inv.id).where('organisation_id', '=', inv.organisation_id)
    .execute()
  const person = await trx.selectFrom('users').select(['name', 'email']).where('id', '=', user.id).executeTakeFirstOrThrow()
  const label = `${person.name} <${person.email}>`
  await record(trx, {
    organisationId: inv.organisation_id, actor: { id: user.id, label }, action: 'member.joined',
    target: { kind: 'user', id: user.id, label }, details: { role: active?.role ?? inv.role, invitationId: inv.id, alreadyMember: !!active },
  })
  return { slug: inv.org_slug, name: inv.org_name, role: active?.role ?? inv.role }
}
