// One finding as the API shows it in lists (with its survey, site and asset), for GET findings/:id.
import { sql } from 'kysely'
import type { FindingListItem } from '#shared/types/survey'
import { reviewerNameSql } from './finding-parts'
import { FINDING_API_COLUMNS } from './finding-list-sql'
import { toFindingListItem } from './surveys'

/** A finding of the organisation (404 for another organisation's id or an archived survey). */
export async function getFinding(ctx: MemberContext, id: string): Promise<FindingListItem> {
  // The finding carries its survey, asset, site and the survey's date and archive (migration 20261205_0100).
  const r = await useDb().selectFrom('findings as f')
    .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'f.organisation_id').onRef('a.id', '=', 'f.asset_id'))
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
    .select(FINDING_API_COLUMNS.map((c) => `f.${c}` as const)).select(['a.label as asset_label', 'si.name as site_name']).select(reviewerNameSql().as('reviewer_name'))
    .select(sql<string>`to_char(f.survey_planned_for, 'YYYY-MM-DD')`.as('planned_for'))
    .where('f.organisation_id', '=', ctx.org.id).where('f.id', '=', id)
    .where('f.survey_archived', '=', false)
    .executeTakeFirst()
  if (!r) throw notFound('Finding')
  return toFindingListItem(r)
}
