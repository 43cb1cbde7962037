import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { assetHistoryQuerySchema, findingRankSchema } from '#shared/schemas/finding'
import type { findingSchema } from '#shared/schemas/survey'
import type { AssetHistoryItem } from '#shared/types/finding'
import type { Page } from '#shared/types/programme'
import type { SurveyFinding } from '#shared/types/survey'
import { assertSurface, findingColumns, reviewerNameSql } from './finding-parts'
import { notifyBandOneFinding } from './notices'
import { changedMeanwhile, pageWindow } from './paging'
import { DEFAULT_CRITERIA_ID, toFinding } from './surveys'

// Saved findings after the moment they were recorded: the thermographer's corrections, the manager's band review,
// and every asset's history of checks and findings.

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

/** The finding with its check's asset and its survey, locked for the change; 404 when not this organisation's. */
async function lockFinding(trx: Transaction<Database>, ctx: MemberContext, id: string) {
  // Lock the survey first (the same order recordFinding uses), then the finding.
  const where = await trx.selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .select(['c.survey_id', 'c.asset_id'])
    .where('f.organisation_id', '=', ctx.org.id).where('f.id', '=', id).where('f.archived_at', 'is', null)
    .executeTakeFirst()
  if (!where) throw notFound('Finding')
  const survey = await trx.selectFrom('surveys').select(['id', 'state', 'thermographer_id', 'instrument_id'])
    .select(sql<string>`to_char(planned_for, 'YYYY-MM-DD')`.as('day'))
    .where('organisation_id', '=', ctx.org.id).where('id', '=', where.survey_id).where('archived_at', 'is', null)
    .forUpdate().executeTakeFirst()
  if (!survey) throw notFound('Finding')
  const finding = await trx.selectFrom('findings').selectAll()
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).forUpdate().executeTakeFirstOrThrow()
  return { survey, finding, assetId: where.asset_id }
}

async function reread(ctx: MemberContext, id: string, assetId: string): Promise<SurveyFinding> {
  const row = await useDb().selectFrom('findings as f').selectAll('f').select(reviewerNameSql().as('reviewer_name'))
    .where('f.organisation_id', '=', ctx.org.id).where('f.id', '=', id).executeTakeFirstOrThrow()
  return toFinding(row, assetId)
}

/**
 * A manager corrects a finding's band on a submitted (or already reviewed) survey, with a written reason. The
 * computed band stays as it was; the reviewed band, reason, reviewer and time are kept beside it.
 */
export async function rankFinding(ctx: MemberContext, id: string, input: z.output<typeof findingRankSchema>): Promise<SurveyFinding> {
  const assetId = await useDb().transaction().execute(async (trx) => {
    const { survey, finding, assetId } = await lockFinding(trx, ctx, id)
    if (survey.state !== 'submitted' && survey.state !== 'reviewed') {
      conflict('A band is corrected on review: wait until the thermographer has submitted the survey.')
    }
    if (finding.version !== input.version) throw changedMeanwhile('finding')
    await trx.updateTable('findings').set({
      reviewed_band: input.band, review_reason: input.reason, reviewed_by: ctx.user.id, reviewed_at: new Date(),
      version: sql`version + 1`, updated_at: new Date(),
    }).where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    // Raised to band 1 on review: the managers hear of it as if it had been recorded so (once per finding).
    if (input.band === 1 && (finding.reviewed_band ?? finding.band) !== 1) {
      await notifyBandOneFinding(trx, ctx, finding, survey.id, assetId, 'reviewed')
    }
    return assetId
  })
  return reread(ctx, id, assetId)
}

/**
 * The assigned thermographer corrects a saved finding while the survey is in progress or returned. The engine runs
 * again here on the new inputs, as when the finding was recorded; a stale version is a 409. A manager's reviewed
 * band stays until the manager changes it (it is shown beside the new computed band).
 */
export async function editFinding(
  ctx: MemberContext,
  id: string,
  version: number,
  input: z.output<typeof findingSchema>,
): Promise<SurveyFinding> {
  const assetId = await useDb().transaction().execute(async (trx) => {
    const { survey, finding, assetId } = await lockFinding(trx, ctx, id)
    if (survey.thermographer_id !== ctx.user.id) {
      throw createError({
        statusCode: 403,
        statusMessage: 'Not your survey',
        data: { message: 'Only the thermographer assigned to this survey can change its findings.' },
      })
    }
    if (survey.state !== 'in_progress' && survey.state !== 'returned') {
      conflict('Findings can only be changed while the survey is in progress or returned. It has been submitted; a manager can return it to you.')
    }
    if (finding.version !== version) {
      throw createError({
        statusCode: 409,
        statusMessage: 'Changed meanwhile',
        data: { message: 'This finding was changed since you opened it (perhaps from another device). Reload it to see the saved values, then make your change again.' },
      })
    }
    if (input.assetId !== assetId) fieldError('assetId', 'A saved finding stays on its asset; record a new finding on the other asset instead.')
    await assertSurface(trx, ctx, input.surfaceId, finding.surface_id)
    const columns = await findingColumns(trx, ctx, survey, input, DEFAULT_CRITERIA_ID)
    await trx.updateTable('findings').set({ ...columns, version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    await trx.updateTable('surveys').set({ version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', survey.id).execute()
    return assetId
  })
  return reread(ctx, id, assetId)
}

/** Every check of an asset with its findings, newest first, paginated; 404 when the asset is not this organisation's. */
export async function assetHistory(
  ctx: MemberContext,
  assetId: string,
  q: z.output<typeof assetHistoryQuerySchema>,
): Promise<Page<AssetHistoryItem>> {
  const db = useDb()
  const asset = await db.selectFrom('assets').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', assetId).executeTakeFirst()
  if (!asset) throw notFound('Asset')
  const base = db.selectFrom('checks as c')
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .where('c.organisation_id', '=', ctx.org.id).where('c.asset_id', '=', assetId).where('s.archived_at', 'is', null)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base.leftJoin('users as u', 'u.id', 'c.checked_by')
      .select(['c.id', 'c.survey_id', 's.state', 'c.outcome', 'c.reason', 'c.note', 'c.created_at', 'u.name as checked_by_name'])
      .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
      // Newest first by survey date, then by when the check was written; the id keeps pages from overlapping.
      .orderBy('s.planned_for', 'desc').orderBy('c.created_at', 'desc').orderBy('c.id', 'desc')
      .limit(limit).offset(offset).execute(),
  ])
  const checkIds = rows.map((r) => r.id)
  const findings = checkIds.length
    ? await db.selectFrom('findings')
      .select(['id', 'check_id', 'component', 'phase', 'object_c', 'band', 'reviewed_band', 'action', 'closed_at'])
      .where('organisation_id', '=', ctx.org.id).where('check_id', 'in', checkIds).where('archived_at', 'is', null)
      .orderBy('created_at').orderBy('id').execute()
    : []
  return {
    items: rows.map((r) => ({
      checkId: r.id,
      surveyId: r.survey_id,
      surveyState: r.state,
      plannedFor: r.planned_for,
      checkedAt: r.created_at.toISOString(),
      outcome: r.outcome,
      reason: r.reason,
      note: r.note,
      checkedBy: r.checked_by_name ?? null,
      findings: findings.filter((f) => f.check_id === r.id).map((f) => ({
        id: f.id, component: f.component, phase: f.phase, objectC: f.object_c, band: f.band,
        effectiveBand: f.reviewed_band ?? f.band,
        corrected: f.reviewed_band !== null && f.reviewed_band !== f.band,
        action: f.action,
        closedAt: f.closed_at ? f.closed_at.toISOString() : null,
      })),
    })),
    total: Number(count.n),
    page: q.page,
    pageSize: q.pageSize,
  }
}

/** Looks the finding up before the body is read, so an id from elsewhere is a 404 whatever the body holds. */
export async function assertFindingExists(ctx: MemberContext, id: string): Promise<void> {
  const row = await useDb().selectFrom('findings').select('id')
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null).executeTakeFirst()
  if (!row) throw notFound('Finding')
}
