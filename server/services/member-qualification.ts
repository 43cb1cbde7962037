import { sql } from 'kysely'

/** Sets the qualification the organisation records for one of its members; 404 for anyone not a current member. */
export async function setQualification(ctx: MemberContext, userId: string, qualification: string): Promise<{ userId: string; qualification: string }> {
  const res = await useDb().updateTable('memberships')
    .set({ qualification, updated_at: new Date(), version: sql`version + 1` })
    .where('organisation_id', '=', ctx.org.id).where('user_id', '=', userId).where('removed_at', 'is', null)
    .executeTakeFirst()
  if (Number(res.numUpdatedRows) === 0) throw notFound('Member')
  return { userId, qualification }
}
