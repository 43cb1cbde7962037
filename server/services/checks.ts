// The organisation's checks (one per asset looked at in a survey), listed and exported with the same filters.
import type { z } from 'zod'
import { sql } from 'kysely'
import type { checkListQuerySchema } from '#shared/schemas/checks'
import type { CheckListItem } from '#shared/types/checks'
import type { Page } from '#shared/types/programme'
import { pageWindow } from './paging'

/** Checks of the organisation, newest survey first, then site code and asset label; filtered and paginated. */
export async function listChecks(ctx: MemberContext, q: z.output<typeof checkListQuerySchema>): Promise<Page<CheckListItem>> {
  let query = useDb().selectFrom('checks as c')
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'c.organisation_id').onRef('a.id', '=', 'c.asset_id'))
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
    .leftJoin('users as u', 'u.id', 'c.checked_by')
    .where('c.organisation_id', '=', ctx.org.id)
    .where('s.archived_at', 'is', null)
  if (q.surveyId) query = query.where('c.survey_id', '=', q.surveyId)
  if (q.assetId) query = query.where('c.asset_id', '=', q.assetId)
  if (q.outcome) query = query.where('c.outcome', '=', q.outcome)
  if (q.from) query = query.where('s.planned_for', '>=', q.from as never)
  if (q.to) query = query.where('s.planned_for', '<=', q.to as never)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    query.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    query.select(['c.id', 'c.survey_id', 'c.asset_id', 'c.outcome', 'c.reason', 'c.note', 'c.created_at', 'a.label', 'a.site_id', 'si.code', 'si.name', 'u.name as checked_by'])
      .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
      .select((eb) => eb.selectFrom('findings as f').whereRef('f.organisation_id', '=', 'c.organisation_id').whereRef('f.check_id', '=', 'c.id')
        .select(eb.fn.countAll<number>().as('n')).as('finding_count'))
      .orderBy('s.planned_for', 'desc').orderBy('si.code').orderBy('a.label').orderBy('c.id')
      .limit(limit).offset(offset).execute(),
  ])
  return {
    items: rows.map((r) => ({
      id: r.id, surveyId: r.survey_id, plannedFor: r.planned_for, siteId: r.site_id, siteCode: r.code, siteName: r.name,
      assetId: r.asset_id, assetLabel: r.label, outcome: r.outcome, reason: r.reason, note: r.note, checkedBy: r.checked_by,
      checkedAt: r.created_at.toISOString(), findingCount: Number(r.finding_count ?? 0),
    })),
    total: Number(count.n), page: q.page, pageSize: q.pageSize,
  }
}
