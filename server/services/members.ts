import { sql, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { Role } from '#shared/permissions'
import { takesSeat } from '#shared/billing/plans'
import { assertSeatFor } from './billing'
import { record } from './audit'

export interface MemberView { userId: string; name: string; email: string; role: Role; since: Date; qualification: string }

/** Active members of the organisation. */
export async function listMembers(ctx: MemberContext): Promise<MemberView[]> {
  const rows = await useDb()
    .selectFrom('memberships as m')
    .innerJoin('users as u', 'u.id', 'm.user_id')
    .select(['u.id', 'u.name', 'u.email', 'm.role', 'm.created_at', 'm.qualification'])
    .where('m.organisation_id', '=', ctx.org.id)
    .where('m.removed_at', 'is', null)
    .orderBy('u.name')
    .execute()
  return rows.map((r) => ({ userId: r.id, name: r.name, email: r.email, role: r.role, since: r.created_at, qualification: r.qualification }))
}

// Owner rows are locked while changing roles so that two owners demoting each other cannot leave none.
async function ownersLocked(trx: Transaction<Database>, orgId: string) {
  const rows = await trx.selectFrom('memberships').select('user_id')
    .where('organisation_id', '=', orgId).where('role', '=', 'owner').where('removed_at', 'is', null)
    .forUpdate().execute()
  return rows.map((r) => r.user_id)
}

function lastOwner(orgName: string) {
  return createError({
    statusCode: 409,
    statusMessage: 'Last owner',
    data: { message: `${orgName} must keep at least one owner. Make someone else an owner first.`, fieldErrors: { role: ['An organisation always keeps at least one owner.'] } },
  })
}

/** Changes a member's role; never leaves the organisation without an owner. */
export async function changeRole(ctx: MemberContext, userId: string, role: Role): Promise<MemberView> {
  return useDb().transaction().execute(async (trx) => {
    const owners = await ownersLocked(trx, ctx.org.id)
    const target = await trx.selectFrom('memberships as m').innerJoin('users as u', 'u.id', 'm.user_id')
      .select(['u.id', 'u.name', 'u.email', 'm.role', 'm.created_at', 'm.qualification'])
      .where('m.organisation_id', '=', ctx.org.id).where('m.user_id', '=', userId).where('m.removed_at', 'is', null)
      .executeTakeFirst()
    if (!target) throw notFound('Member')
    if (target.role === 'owner' && role !== 'owner' && owners.length <= 1) throw lastOwner(ctx.org.name)
    // A viewer given an editing role starts taking a seat.
    if (!takesSeat(target.role)) await assertSeatFor(trx, ctx.org, role, ctx.member.role)
    await trx.updateTable('memberships')
      .set({ role, updated_at: new Date(), version: sql`version + 1` })
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', userId)
      .execute()
    if (target.role !== role) {
      // Becoming or ceasing to be an owner is an ownership change: the details say so.
      const ownership = role === 'owner' ? 'granted' : target.role === 'owner' ? 'given_up' : null
      await record(trx, {
        ctx, action: 'member.role_changed', target: { kind: 'user', id: target.id, label: `${target.name} <${target.email}>` },
        details: { from: target.role, to: role, ...(ownership && { ownership }) },
      })
    }
    return { userId: target.id, name: target.name, email: target.email, role, since: target.created_at, qualification: target.qualification }
  })
}

/** Removes a member (kept as removed, so history keeps the name); never the last owner. */
export async function removeMember(ctx: MemberContext, userId: string): Promise<void> {
  await useDb().transaction().execute(async (trx) => {
    const owners = await ownersLocked(trx, ctx.org.id)
    const target = await trx.selectFrom('memberships as m').innerJoin('users as u', 'u.id', 'm.user_id')
      .select(['m.role', 'u.name', 'u.email'])
      .where('m.organisation_id', '=', ctx.org.id).where('m.user_id', '=', userId).where('m.removed_at', 'is', null)
      .executeTakeFirst()
    if (!target) throw notFound('Member')
    if (target.role === 'owner' && owners.length <= 1) throw lastOwner(ctx.org.name)
    await trx.updateTable('memberships')
      .set({ removed_at: new Date(), updated_at: new Date(), version: sql`version + 1` })
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', userId)
      .execute()
    await record(trx, {
      ctx, action: 'member.removed', target: { kind: 'user', id: userId, label: `${target.name} <${target.email}>` },
      details: { role: target.role },
    })
  })
}
