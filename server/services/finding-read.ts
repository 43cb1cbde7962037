// One finding as the API shows it in lists (with its survey, site and asset), for GET findings/:id.
import { sql } from 'kysely'
import type { FindingListItem } from '#shared/types/survey'
import { reviewerNameSql } from './finding-parts'
import { toFinding } from './surveys'

/** A finding of the organisation (404 for another organisation's id or an archived survey). */
export async function getFinding(ctx: MemberContext, id: string): Promise<FindingListItem> {
  const r = await useDb().selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'c.organisation_id').onRef('a.id', '=', 'c.asset_id'))
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
    .selectAll('f').select(['c.asset_id', 's.id as survey_id', 'a.label as asset_label', 'si.name as site_name']).select(reviewerNameSql().as('reviewer_name'))
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
    .where('f.organisation_id', '=', ctx.org.id).where('f.id', '=', id)
    .where('s.archived_at', 'is', null)
    .executeTakeFirst()
  if (!r) throw notFound('Finding')
  return { ...toFinding(r, r.asset_id), surveyId: r.survey_id, plannedFor: r.planned_for, siteName: r.site_name, assetLabel: r.asset_label }
}
