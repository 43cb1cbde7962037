import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { ReadingWarning } from '#shared/thermal/index'
import { todayIn } from '#shared/schedule'
import {
  type checkSchema,
  type findingListQuerySchema,
  type surveyConditionsSchema,
  type findingSchema,
  type surveyListQuerySchema,
  type surveyPlanSchema,
  type surveyReviewSchema,
  type SurveyStateName,
} from '#shared/schemas/survey'
import type { FindingListItem, SurveyAsset, SurveyDetail, SurveyFinding, SurveyListItem, SurveySite } from '#shared/types/survey'
import type { Page } from '#shared/types/programme'
import { changedMeanwhile, num, pageWindow } from './paging'
import { notifyBandOneFinding } from './notices'
import { assertSurface, findingColumns, findingExtras, reviewerNameSql, type FindingApiRow } from './finding-parts'
import { linkGridToFinding } from './temperature-grids'
import { findingListQueries } from './finding-list-sql'

type Db = ReturnType<typeof useDb> | Transaction<Database>

/** The criteria set findings are ranked with until organisations can choose their own. */
export const DEFAULT_CRITERIA_ID = 'neta-100-18'

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

function surveyQuery(db: Db, orgId: string) {
  return db.selectFrom('surveys as s')
    .innerJoin('users as u', 'u.id', 's.thermographer_id')
    .innerJoin('instruments as i', (j) => j.onRef('i.organisation_id', '=', 's.organisation_id').onRef('i.id', '=', 's.instrument_id'))
    .leftJoin('routes as r', (j) => j.onRef('r.organisation_id', '=', 's.organisation_id').onRef('r.id', '=', 's.route_id'))
    .select([
      's.id', 's.state', 's.version', 's.updated_at', 's.review_comments', 's.route_id', 'r.name as route_name',
      's.thermographer_id', 'u.name as thermographer_name', 's.instrument_id', 'i.make', 'i.model', 'i.serial',
      'i.band_from_um', 'i.band_to_um', 'i.accuracy_k', 'i.accuracy_pct', 'i.ifov_mrad',
    ])
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
    .select(sql<string | null>`to_char(i.calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .select((eb) => eb.selectFrom('survey_sites as ss').whereRef('ss.survey_id', '=', 's.id').select(eb.fn.countAll<number>().as('n')).as('site_count'))
    .select((eb) => eb.selectFrom('survey_sites as ss')
      .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'ss.organisation_id').onRef('a.site_id', '=', 'ss.site_id'))
      .whereRef('ss.survey_id', '=', 's.id').where('a.archived_at', 'is', null)
      .select(eb.fn.countAll<number>().as('n')).as('asset_count'))
    .select((eb) => eb.selectFrom('checks as c').whereRef('c.survey_id', '=', 's.id').select(eb.fn.countAll<number>().as('n')).as('checked_count'))
    .select((eb) => eb.selectFrom('findings as f')
      .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
      .whereRef('c.survey_id', '=', 's.id').select(eb.fn.countAll<number>().as('n')).as('finding_count'))
    .where('s.organisation_id', '=', orgId)
    .where('s.archived_at', 'is', null)
}

type SurveyQueryRow = Awaited<ReturnType<ReturnType<typeof surveyQuery>['executeTakeFirstOrThrow']>>

function toListItem(r: SurveyQueryRow): SurveyListItem {
  return {
    id: r.id,
    plannedFor: r.planned_for,
    state: r.state,
    route: r.route_id ? { id: r.route_id, name: r.route_name ?? '—' } : null,
    thermographer: { id: r.thermographer_id, name: r.thermographer_name },
    instrument: { id: r.instrument_id, label: `${r.make} ${r.model} · ${r.serial}` },
    siteCount: Number(r.site_count ?? 0),
    assetCount: Number(r.asset_count ?? 0),
    checkedCount: Number(r.checked_count ?? 0),
    findingCount: Number(r.finding_count ?? 0),
    version: r.version,
    updatedAt: r.updated_at.toISOString(),
  }
}

/** Surveys of the organisation, filtered and paginated on the server. */
export async function listSurveys(ctx: MemberContext, q: z.output<typeof surveyListQuerySchema>): Promise<Page<SurveyListItem>> {
  const db = useDb()
  let query = surveyQuery(db, ctx.org.id)
  if (q.state) query = query.where('s.state', '=', q.state)
  if (q.from) query = query.where('s.planned_for', '>=', q.from as never)
  if (q.to) query = query.where('s.planned_for', '<=', q.to as never)
  if (q.thermographerId) query = query.where('s.thermographer_id', '=', q.thermographerId)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const count = await query.clearSelect().select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
  const sorted = q.sort === 'date' ? query.orderBy('s.planned_for', 'asc') : q.sort === 'state' ? query.orderBy('s.state').orderBy('s.planned_for', 'desc') : query.orderBy('s.planned_for', 'desc')
  const rows = await sorted.orderBy('s.created_at', 'desc').orderBy('s.id').limit(limit).offset(offset).execute()
  return { items: rows.map(toListItem), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

export function toFinding(f: FindingApiRow, assetId: string): SurveyFinding {
  // Every property written out (no `...findingExtras(f)` first): V8 builds an object literal that starts with a spread
  // and goes on with thirty properties some hundred times slower, and a list page makes fifty of them.
  const extras = findingExtras(f)
  return {
    effectiveBand: extras.effectiveBand,
    review: extras.review,
    closedAt: extras.closedAt,
    surfaceId: extras.surfaceId,
    id: f.id,
    checkId: f.check_id,
    assetId,
    component: f.component,
    phase: f.phase,
    inputs: {
      apparentC: f.apparent_c, referenceC: f.reference_c, ambientC: f.ambient_c, emissivity: f.emissivity, reflectedC: f.reflected_c,
      reflectedMethod: f.reflected_method, distanceM: f.distance_m, transmittance: f.transmittance, windowTransmittance: f.window_transmittance,
      windowC: f.window_c, loadA: f.load_a, ratedA: f.rated_a, windMs: f.wind_ms,
    },
    probableCause: f.probable_cause,
    causeNotes: f.cause_notes,
    notes: f.notes,
    objectC: f.object_c,
    riseOverReferenceK: f.rise_over_reference_k,
    riseOverAmbientK: f.rise_over_ambient_k,
    loadScaledRiseK: f.load_scaled_rise_k,
    band: f.band,
    bandBasis: f.band_basis,
    action: f.action,
    repairDeadlineDays: f.repair_deadline_days,
    uncertaintyLowC: f.uncertainty_low_c,
    uncertaintyHighC: f.uncertainty_high_c,
    warnings: (f.warnings ?? []) as ReadingWarning[],
    criteriaId: f.criteria_id,
    criteriaVersion: f.criteria_version,
    version: f.version,
  }
}

/** A finding as lists show it, with its survey, site and asset (findings list, GET findings/:id). */
export function toFindingListItem(
  r: FindingApiRow & { planned_for: string; site_name: string; asset_label: string },
): FindingListItem {
  // Added to the finding rather than spread into a new literal (see toFinding).
  return Object.assign(toFinding(r, r.asset_id), { surveyId: r.survey_id, plannedFor: r.planned_for, siteName: r.site_name, assetLabel: r.asset_label })
}

/** One survey with its sites in visiting order, the assets at each, their checks and findings; 404 when not this organisation's. */
export async function getSurvey(ctx: MemberContext, id: string, db: Db = useDb()): Promise<SurveyDetail> {
  const row = await surveyQuery(db, ctx.org.id).where('s.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Survey')
  const [sites, assets, checks, findings] = await Promise.all([
    db.selectFrom('survey_sites as ss')
      .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'ss.organisation_id').onRef('si.id', '=', 'ss.site_id'))
      .select(['ss.id', 'ss.site_id', 'ss.position', 'si.code', 'si.name', 'si.safety_flags', 'si.safety_notes', 'ss.ambient_c', 'ss.wind_ms', 'ss.humidity_pct', 'ss.sky', 'ss.load_notes'])
      .where('ss.organisation_id', '=', ctx.org.id).where('ss.survey_id', '=', id).orderBy('ss.position').execute(),
    db.selectFrom('survey_sites as ss')
      .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'ss.organisation_id').onRef('a.site_id', '=', 'ss.site_id'))
      .select(['a.id', 'a.site_id', 'a.label', 'a.asset_class', 'a.rated_current_a'])
      .where('ss.organisation_id', '=', ctx.org.id).where('ss.survey_id', '=', id).where('a.archived_at', 'is', null)
      .orderBy('a.label').execute(),
    db.selectFrom('checks').selectAll().where('organisation_id', '=', ctx.org.id).where('survey_id', '=', id).execute(),
    db.selectFrom('findings as f')
      .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
      .selectAll('f').select('c.asset_id').select(reviewerNameSql().as('reviewer_name'))
      .where('f.organisation_id', '=', ctx.org.id).where('c.survey_id', '=', id).orderBy('f.created_at').execute(),
  ])
  const checkByAsset = new Map(checks.map((c) => [c.asset_id, c]))
  const findingsByAsset = new Map<string, SurveyFinding[]>()
  for (const f of findings) {
    const list = findingsByAsset.get(f.asset_id) ?? []
    list.push(toFinding(f, f.asset_id))
    findingsByAsset.set(f.asset_id, list)
  }
  const summary = { assets: 0, clear: 0, finding: 0, notReached: 0, unchecked: 0, byBand: {} as Record<string, number> }
  const assetsBySite = new Map<string, SurveyAsset[]>()
  for (const a of assets) {
    const c = checkByAsset.get(a.id)
    summary.assets++
    if (!c) summary.unchecked++
    else if (c.outcome === 'clear') summary.clear++
    else if (c.outcome === 'finding') summary.finding++
    else summary.notReached++
    const list = assetsBySite.get(a.site_id) ?? []
    list.push({
      id: a.id, label: a.label, assetClass: a.asset_class, ratedCurrentA: num(a.rated_current_a),
      check: c ? { id: c.id, assetId: c.asset_id, outcome: c.outcome, reason: c.reason, note: c.note, version: c.version } : null,
      findings: findingsByAsset.get(a.id) ?? [],
    })
    assetsBySite.set(a.site_id, list)
  }
  for (const f of findings) {
    // A manager's reviewed band counts instead of the computed one.
    const band = f.reviewed_band ?? f.band
    const key = band === null ? 'none' : String(band)
    summary.byBand[key] = (summary.byBand[key] ?? 0) + 1
  }
  const outSites: SurveySite[] = sites.map((s) => ({
    id: s.id, siteId: s.site_id, position: s.position, code: s.code, name: s.name, safetyFlags: s.safety_flags, safetyNotes: s.safety_notes,
    conditions: { ambientC: num(s.ambient_c), windMs: num(s.wind_ms), humidityPct: num(s.humidity_pct), sky: s.sky, loadNotes: s.load_notes },
    assets: assetsBySite.get(s.site_id) ?? [],
  }))
  return {
    ...toListItem(row),
    reviewComments: row.review_comments,
    instrumentBand: {
      fromUm: Number(row.band_from_um), toUm: Number(row.band_to_um), accuracyK: num(row.accuracy_k), accuracyPct: num(row.accuracy_pct),
      ifovMrad: num(row.ifov_mrad), calibrationDue: row.calibration_due,
    },
    sites: outSites,
    summary,
    assignedToMe: row.thermographer_id === ctx.user.id,
  }
}

/** The signed-in person's survey for a date (today in the organisation's time zone by default), or null. */
export async function todaysSurvey(ctx: MemberContext, date: string | undefined): Promise<{ date: string; survey: SurveyDetail | null }> {
  const db = useDb()
  let day = date
  if (!day) {
    const org = await db.selectFrom('organisations').select('time_zone').where('id', '=', ctx.org.id).executeTakeFirstOrThrow()
    day = todayIn(org.time_zone)
  }
  const row = await db.selectFrom('surveys').select('id')
    .where('organisation_id', '=', ctx.org.id).where('thermographer_id', '=', ctx.user.id).where('archived_at', 'is', null)
    .where('planned_for', '=', day as never).where('state', 'in', ['planned', 'in_progress', 'returned'])
    .orderBy('created_at').executeTakeFirst()
  return { date: day, survey: row ? await getSurvey(ctx, row.id, db) : null }
}

/** Plans a survey from a route's stops (in route order) or from chosen sites. */
export async function planSurvey(ctx: MemberContext, input: z.output<typeof surveyPlanSchema>): Promise<SurveyDetail> {
  const id = await useDb().transaction().execute(async (trx) => {
    const m = await trx.selectFrom('memberships').select('role')
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', input.thermographerId).where('removed_at', 'is', null)
      .executeTakeFirst()
    if (!m || !['owner', 'manager', 'thermographer'].includes(m.role)) fieldError('thermographerId', 'Choose a member who may run surveys (a thermographer, manager or owner).')
    const inst = await trx.selectFrom('instruments').select('id')
      .where('organisation_id', '=', ctx.org.id).where('id', '=', input.instrumentId).where('archived_at', 'is', null).executeTakeFirst()
    if (!inst) fieldError('instrumentId', 'Choose an instrument of this organisation that is not archived.')
    let siteIds = input.siteIds ?? []
    if (input.routeId) {
      const route = await trx.selectFrom('routes').select('id')
        .where('organisation_id', '=', ctx.org.id).where('id', '=', input.routeId).where('archived_at', 'is', null).executeTakeFirst()
      if (!route) fieldError('routeId', 'Choose a route of this organisation that is not archived.')
      if (!siteIds.length) {
        const stops = await trx.selectFrom('route_stops').select('site_id')
          .where('organisation_id', '=', ctx.org.id).where('route_id', '=', input.routeId).orderBy('position').execute()
        siteIds = stops.map((s) => s.site_id)
      }
      if (!siteIds.length) fieldError('routeId', 'This route has no sites yet: add sites to it, or pick sites for the survey.')
    }
    const found = await trx.selectFrom('sites').select('id')
      .where('organisation_id', '=', ctx.org.id).where('id', 'in', siteIds).where('archived_at', 'is', null).execute()
    if (found.length !== siteIds.length) fieldError('siteIds', 'Some of the chosen sites were not found or are archived.')
    const row = await trx.insertInto('surveys').values({
      organisation_id: ctx.org.id, route_id: input.routeId ?? null, planned_for: input.plannedFor, thermographer_id: input.thermographerId,
      instrument_id: input.instrumentId, created_by: ctx.user.id, reviewed_by: null, started_at: null, submitted_at: null, reviewed_at: null, archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('survey_sites')
      .values(siteIds.map((siteId, position) => ({ organisation_id: ctx.org.id, survey_id: row.id, site_id: siteId, position, sky: null })))
      .execute()
    return row.id
  })
  return getSurvey(ctx, id)
}

/** Locks the survey row; 404 when it is not this organisation's. */
async function lockSurvey(trx: Db, ctx: MemberContext, id: string) {
  const row = await trx.selectFrom('surveys').select(['id', 'state', 'version', 'thermographer_id', 'instrument_id', 'planned_for'])
    .select(sql<string>`to_char(planned_for, 'YYYY-MM-DD')`.as('day'))
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null)
    .forUpdate().executeTakeFirst()
  if (!row) throw notFound('Survey')
  return row
}

/** Looks the survey up before the body is read, so an id from elsewhere is a 404 whatever the body holds. */
export async function assertSurveyExists(ctx: MemberContext, id: string): Promise<void> {
  const row = await useDb().selectFrom('surveys').select('id')
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null).executeTakeFirst()
  if (!row) throw notFound('Survey')
}

// Recording is personal: the survey's data is the assigned thermographer's testimony, so nobody else writes it.
function assertAssigned(ctx: MemberContext, s: { thermographer_id: string }) {
  if (s.thermographer_id !== ctx.user.id) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Not your survey',
      data: { message: 'Only the thermographer assigned to this survey can record on it or change its state.' },
    })
  }
}

function assertRecording(s: { state: SurveyStateName }) {
  if (s.state !== 'in_progress' && s.state !== 'returned') {
    const why = s.state === 'planned' ? 'Start the survey first.' : 'It has been submitted; a manager can return it to you.'
    conflict(`Checks can only be recorded on a survey in progress or returned. ${why}`)
  }
}

async function bump(trx: Db, ctx: MemberContext, id: string, set: Record<string, unknown>) {
  await trx.updateTable('surveys').set({ ...set, version: sql`version + 1`, updated_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
}

/** Starts a planned survey (assigned thermographer only). */
export async function startSurvey(ctx: MemberContext, id: string, version: number): Promise<SurveyDetail> {
  await useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, id)
    assertAssigned(ctx, s)
    if (s.version !== version) throw changedMeanwhile('survey')
    if (s.state !== 'planned') conflict('Only a planned survey can be started.')
    await bump(trx, ctx, id, { state: 'in_progress', started_at: new Date() })
  })
  return getSurvey(ctx, id)
}

/** Hands the survey in for review; every asset must have a check (not reached counts, with its reason). */
export async function submitSurvey(ctx: MemberContext, id: string, version: number): Promise<SurveyDetail> {
  await useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, id)
    assertAssigned(ctx, s)
    if (s.version !== version) throw changedMeanwhile('survey')
    if (s.state !== 'in_progress' && s.state !== 'returned') conflict('Only a survey in progress or returned can be submitted.')
    const open = await trx.selectFrom('survey_sites as ss')
      .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'ss.organisation_id').onRef('a.site_id', '=', 'ss.site_id'))
      .leftJoin('checks as c', (j) => j.onRef('c.survey_id', '=', 'ss.survey_id').onRef('c.asset_id', '=', 'a.id'))
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('ss.organisation_id', '=', ctx.org.id).where('ss.survey_id', '=', id).where('a.archived_at', 'is', null).where('c.id', 'is', null)
      .executeTakeFirstOrThrow()
    const n = Number(open.n)
    if (n > 0) {
      throw createError({
        statusCode: 400,
        statusMessage: 'Assets left unchecked',
        data: { message: `${n} asset${n === 1 ? ' has' : 's have'} no check yet. Record each as clear or finding, or mark it not reached with a reason.` },
      })
    }
    await bump(trx, ctx, id, { state: 'submitted', submitted_at: new Date() })
  })
  return getSurvey(ctx, id)
}

/** A manager's decision on a submitted survey: reviewed, or returned with comments. */
export async function reviewSurvey(ctx: MemberContext, id: string, input: z.output<typeof surveyReviewSchema>): Promise<SurveyDetail> {
  await useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, id)
    if (s.version !== input.version) throw changedMeanwhile('survey')
    if (s.state !== 'submitted') conflict('Only a submitted survey can be reviewed or returned.')
    await bump(trx, ctx, id, {
      state: input.decision, review_comments: input.comments, reviewed_by: ctx.user.id, reviewed_at: input.decision === 'reviewed' ? new Date() : null,
    })
  })
  return getSurvey(ctx, id)
}

async function assetInSurvey(trx: Db, ctx: MemberContext, surveyId: string, assetId: string) {
  const a = await trx.selectFrom('assets as a')
    .innerJoin('survey_sites as ss', (j) => j.onRef('ss.organisation_id', '=', 'a.organisation_id').onRef('ss.site_id', '=', 'a.site_id'))
    .select('a.id')
    .where('a.organisation_id', '=', ctx.org.id).where('a.id', '=', assetId).where('ss.survey_id', '=', surveyId).where('a.archived_at', 'is', null)
    .executeTakeFirst()
  if (!a) fieldError('assetId', 'This asset is not at one of the survey’s sites.')
}

async function upsertCheck(trx: Db, ctx: MemberContext, surveyId: string, input: { assetId: string; outcome: 'clear' | 'finding' | 'not_reached'; reason?: string | null; note?: string }) {
  const row = await trx.insertInto('checks').values({
    organisation_id: ctx.org.id, survey_id: surveyId, asset_id: input.assetId, outcome: input.outcome,
    reason: (input.reason ?? null) as never, note: input.note ?? '', checked_by: ctx.user.id,
  })
    .onConflict((oc) => oc.columns(['survey_id', 'asset_id']).doUpdateSet({
      outcome: input.outcome, reason: (input.reason ?? null) as never, note: input.note ?? '', checked_by: ctx.user.id,
      version: sql`checks.version + 1`, updated_at: new Date(),
    }))
    .returning('id').executeTakeFirstOrThrow()
  return row.id
}

/** Records (or changes) the check of one asset; a check that holds findings stays a finding. */
export async function recordCheck(ctx: MemberContext, surveyId: string, input: z.output<typeof checkSchema>): Promise<SurveyDetail> {
  await useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, surveyId)
    assertAssigned(ctx, s)
    assertRecording(s)
    await assetInSurvey(trx, ctx, surveyId, input.assetId)
    // Findings are inspection history: they are never dropped by turning their check into something else.
    if (input.outcome !== 'finding') {
      const held = await trx.selectFrom('findings as f')
        .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
        .select((eb) => eb.fn.countAll<number>().as('n'))
        .where('f.organisation_id', '=', ctx.org.id).where('c.survey_id', '=', surveyId).where('c.asset_id', '=', input.assetId)
        .executeTakeFirstOrThrow()
      if (Number(held.n) > 0) fieldError('outcome', 'This asset already has findings recorded on this survey, so its check stays a finding.', 409)
    }
    await upsertCheck(trx, ctx, surveyId, input)
    await bump(trx, ctx, surveyId, {})
  })
  return getSurvey(ctx, surveyId)
}

/** Field conditions at one site of the survey. */
export async function recordConditions(
  ctx: MemberContext,
  surveyId: string,
  input: z.output<typeof surveyConditionsSchema>,
): Promise<SurveyDetail> {
  await useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, surveyId)
    assertAssigned(ctx, s)
    assertRecording(s)
    const res = await trx.updateTable('survey_sites').set({
      ambient_c: input.ambientC ?? null, wind_ms: input.windMs ?? null, humidity_pct: input.humidityPct ?? null, sky: input.sky ?? null,
      load_notes: input.loadNotes ?? '', version: sql`version + 1`, updated_at: new Date(),
    }).where('organisation_id', '=', ctx.org.id).where('survey_id', '=', surveyId).where('site_id', '=', input.siteId).executeTakeFirst()
    if (Number(res.numUpdatedRows) === 0) fieldError('siteId', 'This site is not part of the survey.')
  })
  return getSurvey(ctx, surveyId)
}

/**
 * Records a finding: the inputs are validated, the engine is run here on the server (client figures are never
 * trusted), and the inputs, the computed values and the criteria set's id and version are stored together.
 */
export async function recordFinding(ctx: MemberContext, surveyId: string, input: z.output<typeof findingSchema>): Promise<SurveyFinding> {
  return useDb().transaction().execute(async (trx) => {
    const s = await lockSurvey(trx, ctx, surveyId)
    assertAssigned(ctx, s)
    assertRecording(s)
    await assetInSurvey(trx, ctx, surveyId, input.assetId)
    await assertSurface(trx, ctx, input.surfaceId)
    const columns = await findingColumns(trx, ctx, s, input, DEFAULT_CRITERIA_ID)
    const checkId = await upsertCheck(trx, ctx, surveyId, { assetId: input.assetId, outcome: 'finding', note: '' })
    const row = await trx.insertInto('findings').values({ organisation_id: ctx.org.id, check_id: checkId, ...columns })
      .returningAll().executeTakeFirstOrThrow()
    if (input.gridId) await linkGridToFinding(trx, ctx, { gridId: input.gridId, surveyId, assetId: input.assetId, findingId: row.id })
    await bump(trx, ctx, surveyId, {})
    // Band 1: the managers hear of it at once (notice in the same transaction; e-mail through the outbox).
    if (row.band === 1) await notifyBandOneFinding(trx, ctx, row, surveyId, input.assetId)
    return toFinding(row, input.assetId)
  })
}

/** Findings of the organisation, newest survey first, filtered by band or survey, paginated. */
export async function listFindings(
  ctx: MemberContext,
  q: z.output<typeof findingListQuerySchema>,
): Promise<Page<FindingListItem>> {
  // Built in finding-list-sql.ts, so the load benchmark can time the very same SQL straight against PostgreSQL.
  const db = useDb()
  const timeZone = q.from || q.to
    ? (await db.selectFrom('organisations').select('time_zone').where('id', '=', ctx.org.id).executeTakeFirstOrThrow()).time_zone
    : undefined
  const { count: countQuery, countCap, rows: rowsQuery } = findingListQueries(db, ctx.org.id, q, timeZone)
  const [count, rows] = await Promise.all([countQuery.executeTakeFirstOrThrow(), rowsQuery.execute()])
  const n = Number(count.n)
  return {
    items: rows.map(toFindingListItem),
    // Counted up to countCap: beyond it the list says "more than countCap".
    total: Math.min(n, countCap),
    ...(n > countCap ? { totalCapped: true } : {}),
    page: q.page,
    pageSize: q.pageSize,
  }
}
