import type { Transaction } from 'kysely'
import type { Database } from '../database'

// Demo rows for the band review: on the reviewed survey the work-orders seed adds, the manager has corrected the
// band of one open finding with a written reason, so the review screen, the asset history and the schedule show a
// corrected band at once. Runs after seedDemoWorkOrders; does nothing when that survey is not there.

/** Marks one open finding of the demo organisation's latest reviewed survey as corrected on review. */
export async function seedDemoFieldwork(trx: Transaction<Database>, ids: { orgId: string }): Promise<void> {
  const manager = await trx.selectFrom('users').select('id').where('email', '=', 'manager@lowmoor.example').executeTakeFirst()
  const finding = await trx.selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .select(['f.id', 'f.band', 's.reviewed_at'])
    .where('f.organisation_id', '=', ids.orgId).where('s.state', '=', 'reviewed').where('f.closed_at', 'is', null)
    .where('f.band', 'in', [1, 3])
    .orderBy('s.planned_for', 'desc').orderBy('f.band', 'desc').orderBy('f.created_at')
    .executeTakeFirst()
  if (!manager || !finding || finding.band === null) return
  // Band 3 → 2 (watch it more closely), band 1 → 2 (the load that day was exceptional): either way band 2, the
  // default monitor band, so the asset's interval is shortened in the programme.
  const reason = finding.band === 3
    ? 'Same joint ran warm at the last survey too; ranked one band more severe so it is watched more often.'
    : 'Load on the day was about 140 % of normal after a feeder outage; at normal load the rise is in the monitor band.'
  await trx.updateTable('findings').set({
    reviewed_band: 2, review_reason: reason, reviewed_by: manager.id, reviewed_at: finding.reviewed_at ?? new Date(),
  }).where('organisation_id', '=', ids.orgId).where('id', '=', finding.id).execute()
}
