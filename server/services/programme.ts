import { sql, type AliasedSelectQueryBuilder, type Expression, type QueryCreator, type SqlBool } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { programmeAssetQuerySchema, programmeGroupQuerySchema } from '#shared/schemas/programme'
import type { MapSite, Page, ProgrammeAssetRow, ProgrammeGroupRow, ProgrammeSummary, SiteSummary } from '#shared/types/programme'
import { assetDueSql, siteOpenFindingsSql, siteWorstBandSql } from './schedule-sql'
import { likePattern, num, pageWindow } from './paging'
import { programmeSettings } from './programme-settings'

type Band = 1 | 2 | 3 | 4

/** Every active asset of the organisation (on an active site) with its interval and due date. */
function dueAssets(qc: QueryCreator<Database>, orgId: string, today: string) {
  const d = assetDueSql(today)
  return qc.selectFrom('assets as a')
    .innerJoin('organisations as o', 'o.id', 'a.organisation_id')
    .innerJoin('sites as s', (j) => j.onRef('s.organisation_id', '=', 'a.organisation_id').onRef('s.id', '=', 'a.site_id'))
    .select(['a.id', 'a.site_id', 'a.label', 'a.asset_class', 'a.condition', 's.code as site_code', 's.name as site_name'])
    .select([
      d.months.as('interval_months'),
      d.reason.as('interval_reason'),
      d.dueOn.as('due_on'),
      d.baseline.as('baseline'),
      d.lastCheckedOn.as('last_checked_on'),
    ])
    .where('a.organisation_id', '=', orgId)
    .where('a.archived_at', 'is', null)
    .where('s.archived_at', 'is', null)
}

const isoDate = (e: Expression<unknown>) => sql<string>`to_char(${e}, 'YYYY-MM-DD')`

/** Counts of assets overdue and due in the next 30, 60 and 90 days. */
export async function programmeSummary(ctx: MemberContext, window: number): Promise<ProgrammeSummary> {
  const { today } = await programmeSettings(ctx.org.id)
  const t = sql`${today}::date`
  const row = await useDb().with('due', (qc) => dueAssets(qc, ctx.org.id, today))
    .selectFrom('due')
    .select([
      sql<number>`count(*)`.as('assets'),
      sql<number>`count(*) filter (where due_on < ${t})`.as('overdue'),
      sql<number>`count(*) filter (where baseline)`.as('baseline'),
      sql<number>`count(*) filter (where due_on >= ${t} and due_on <= ${t} + 30)`.as('due30'),
      sql<number>`count(*) filter (where due_on >= ${t} and due_on <= ${t} + 60)`.as('due60'),
      sql<number>`count(*) filter (where due_on >= ${t} and due_on <= ${t} + 90)`.as('due90'),
    ])
    .executeTakeFirstOrThrow()
  return {
    today, window, assets: Number(row.assets), overdue: Number(row.overdue), baseline: Number(row.baseline),
    due30: Number(row.due30), due60: Number(row.due60), due90: Number(row.due90),
  }
}

type GroupQuery = z.output<typeof programmeGroupQuerySchema>

function groupCounts(today: string, window: number) {
  const t = sql`${today}::date`
  return [
    sql<number>`count(d.id)`.as('assets'),
    sql<number>`count(d.id) filter (where d.due_on < ${t})`.as('overdue'),
    sql<number>`count(d.id) filter (where d.baseline)`.as('baseline'),
    sql<number>`count(d.id) filter (where d.due_on >= ${t} and d.due_on <= ${t} + ${window}::int)`.as('due_in_window'),
    sql<string | null>`to_char(min(d.due_on), 'YYYY-MM-DD')`.as('next_due'),
  ] as const
}

interface GroupRow {
  id: string
  code: string | null
  name: string
  latitude: number | null
  longitude: number | null
  assets: number
  overdue: number
  baseline: number
  due_in_window: number
  next_due: string | null
}

async function pageOfGroups(grouped: AliasedSelectQueryBuilder<GroupRow, 'g'>, q: GroupQuery): Promise<Page<ProgrammeGroupRow>> {
  const db = useDb()
  const filtered = (qc: QueryCreator<Database>) => {
    let g = qc.selectFrom(grouped).selectAll('g')
    if (q.show === 'due') g = g.where((eb) => eb.or([eb('g.overdue', '>', 0), eb('g.due_in_window', '>', 0)]))
    return g
  }
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  let rows = filtered(db)
  if (q.sort === 'overdue') rows = rows.orderBy('g.overdue', 'desc')
  if (q.sort !== 'name') rows = rows.orderBy(sql`g.next_due asc nulls last`)
  const [count, items] = await Promise.all([
    db.selectFrom(filtered(db).as('f')).select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    rows.orderBy('g.name').orderBy('g.id').limit(limit).offset(offset).execute(),
  ])
  return {
    items: items.map((r) => ({
      id: r.id, code: r.code, name: r.name, assets: Number(r.assets), overdue: Number(r.overdue), baseline: Number(r.baseline),
      dueInWindow: Number(r.due_in_window), nextDue: r.next_due, latitude: r.latitude, longitude: r.longitude,
    })),
    total: Number(count.n),
    page: q.page,
    pageSize: q.pageSize,
  }
}

function sitesGrouped(orgId: string, today: string, q: GroupQuery) {
  const db = useDb()
  let sites = db.selectFrom('sites as s')
    .leftJoin(dueAssets(db, orgId, today).as('d'), 'd.site_id', 's.id')
    .select(['s.id', 's.code', 's.name', 's.latitude', 's.longitude'])
    .select(groupCounts(today, q.window))
    .where('s.organisation_id', '=', orgId)
    .where('s.archived_at', 'is', null)
    .groupBy('s.id')
  if (q.q) {
    const like = likePattern(q.q)
    sites = sites.where((eb) => eb.or([eb('s.name', 'ilike', like), eb('s.code', 'ilike', like)]))
  }
  return sites
}

function routesGrouped(orgId: string, today: string, q: GroupQuery) {
  const db = useDb()
  let routes = db.selectFrom('routes as r')
    .leftJoin('route_stops as rs', (j) => j.onRef('rs.organisation_id', '=', 'r.organisation_id').onRef('rs.route_id', '=', 'r.id'))
    .leftJoin(dueAssets(db, orgId, today).as('d'), 'd.site_id', 'rs.site_id')
    .select(['r.id', sql<string | null>`null::text`.as('code'), 'r.name', sql<number | null>`null::float8`.as('latitude'), sql<number | null>`null::float8`.as('longitude')])
    .select(groupCounts(today, q.window))
    .where('r.organisation_id', '=', orgId)
    .where('r.archived_at', 'is', null)
    .groupBy('r.id')
  if (q.q) routes = routes.where('r.name', 'ilike', likePattern(q.q))
  return routes
}

/** What is due per site: overdue, due within the window, next due date; paginated. */
export async function programmeBySite(ctx: MemberContext, q: GroupQuery): Promise<Page<ProgrammeGroupRow>> {
  const { today } = await programmeSettings(ctx.org.id)
  return pageOfGroups(sitesGrouped(ctx.org.id, today, q).as('g'), q)
}

/** What is due per route (the assets of its sites); paginated. */
export async function programmeByRoute(ctx: MemberContext, q: GroupQuery): Promise<Page<ProgrammeGroupRow>> {
  const { today } = await programmeSettings(ctx.org.id)
  return pageOfGroups(routesGrouped(ctx.org.id, today, q).as('g'), q)
}

/** Assets with their due dates, soonest first, filtered by site, route, status and text; paginated. */
export async function programmeAssets(ctx: MemberContext, q: z.output<typeof programmeAssetQuerySchema>): Promise<Page<ProgrammeAssetRow> & { today: string }> {
  const { today } = await programmeSettings(ctx.org.id)
  const db = useDb()
  const t = sql`${today}::date`
  let rows = db.selectFrom(dueAssets(db, ctx.org.id, today).as('d')).selectAll('d')
  if (q.siteId) rows = rows.where('d.site_id', '=', q.siteId)
  if (q.routeId) {
    const routeId = q.routeId
    rows = rows.where('d.site_id', 'in', (eb) => eb.selectFrom('route_stops as rs').select('rs.site_id')
      .where('rs.organisation_id', '=', ctx.org.id).where('rs.route_id', '=', routeId))
  }
  if (q.status === 'overdue') rows = rows.where(sql<SqlBool>`d.due_on < ${t}`)
  if (q.status === 'due') rows = rows.where(sql<SqlBool>`d.due_on >= ${t} and d.due_on <= ${t} + ${q.window}::int`)
  if (q.q) {
    const like = likePattern(q.q)
    rows = rows.where((eb) => eb.or([eb('d.label', 'ilike', like), eb('d.site_name', 'ilike', like), eb('d.site_code', 'ilike', like)]))
  }
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, items] = await Promise.all([
    rows.clearSelect().select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    rows.select([isoDate(sql.ref('d.due_on')).as('due_text'), isoDate(sql.ref('d.last_checked_on')).as('last_text')])
      .orderBy('d.due_on').orderBy('d.site_code').orderBy('d.label').orderBy('d.id')
      .limit(limit).offset(offset).execute(),
  ])
  return {
    today,
    items: items.map((r) => {
      const days = Math.round((Date.parse(r.due_text) - Date.parse(today)) / 86_400_000)
      return {
        id: r.id, label: r.label, assetClass: r.asset_class, siteId: r.site_id, siteCode: r.site_code, siteName: r.site_name,
        condition: r.condition, intervalMonths: Number(r.interval_months), intervalReason: r.interval_reason,
        lastCheckedOn: r.last_text, dueOn: r.due_text, baseline: r.baseline,
        status: days < 0 ? 'overdue' : days <= q.window ? 'due' : 'later',
      }
    }),
    total: Number(count.n),
    page: q.page,
    pageSize: q.pageSize,
  }
}

/** Every active site for the map, with its worst open band and what is overdue or due now. */
export async function mapSites(ctx: MemberContext): Promise<{ today: string; sites: MapSite[] }> {
  const { today } = await programmeSettings(ctx.org.id)
  const db = useDb()
  const t = sql`${today}::date`
  const rows = await db.selectFrom('sites as s')
    .leftJoin(dueAssets(db, ctx.org.id, today).as('d'), 'd.site_id', 's.id')
    .select(['s.id', 's.code', 's.name', 's.kind', 's.latitude', 's.longitude'])
    .select([
      siteWorstBandSql().as('worst_band'),
      sql<number>`count(d.id) filter (where d.due_on < ${t})`.as('overdue'),
      sql<number>`count(d.id) filter (where d.due_on <= ${t})`.as('due_now'),
    ])
    .where('s.organisation_id', '=', ctx.org.id)
    .where('s.archived_at', 'is', null)
    .groupBy('s.id')
    .orderBy('s.name')
    .execute()
  return {
    today,
    sites: rows.map((r) => ({
      id: r.id, code: r.code, name: r.name, kind: r.kind, latitude: r.latitude, longitude: r.longitude,
      worstBand: (r.worst_band ?? null) as Band | null, overdue: Number(r.overdue), dueNow: Number(r.due_now),
    })),
  }
}

/** A site's summary for the map: assets, due dates, open findings and the routes that visit it. */
export async function siteSummary(ctx: MemberContext, siteId: string): Promise<SiteSummary> {
  const { today } = await programmeSettings(ctx.org.id)
  const db = useDb()
  const t = sql`${today}::date`
  const site = await db.selectFrom('sites as s')
    .select(['s.id', 's.code', 's.name', 's.kind', 's.voltage_kv', 's.latitude', 's.longitude', 's.access_notes', 's.safety_notes'])
    .select(siteWorstBandSql().as('worst_band'))
    .select(siteOpenFindingsSql().as('open_findings'))
    .where('s.organisation_id', '=', ctx.org.id).where('s.id', '=', siteId)
    .executeTakeFirst()
  if (!site) throw notFound('Site')
  const due = () => db.selectFrom(dueAssets(db, ctx.org.id, today).as('d')).where('d.site_id', '=', siteId)
  const [counts, upcoming, routes] = await Promise.all([
    due().select([
      sql<number>`count(*)`.as('assets'),
      sql<number>`count(*) filter (where d.due_on < ${t})`.as('overdue'),
      sql<number>`count(*) filter (where d.baseline)`.as('baseline'),
      sql<number>`count(*) filter (where d.due_on >= ${t} and d.due_on <= ${t} + 30)`.as('due30'),
      sql<number>`count(*) filter (where d.due_on >= ${t} and d.due_on <= ${t} + 90)`.as('due90'),
      isoDate(sql`min(d.due_on)`).as('next_due'),
    ]).executeTakeFirstOrThrow(),
    due().select(['d.id', 'd.label', 'd.baseline', 'd.interval_months', isoDate(sql.ref('d.due_on')).as('due_text')])
      .orderBy('d.due_on').orderBy('d.label').limit(5).execute(),
    db.selectFrom('route_stops as rs')
      .innerJoin('routes as r', (j) => j.onRef('r.organisation_id', '=', 'rs.organisation_id').onRef('r.id', '=', 'rs.route_id'))
      .select(['r.id', 'r.name'])
      .where('rs.organisation_id', '=', ctx.org.id).where('rs.site_id', '=', siteId).where('r.archived_at', 'is', null)
      .orderBy('r.name').execute(),
  ])
  return {
    id: site.id, code: site.code, name: site.name, kind: site.kind, voltageKv: num(site.voltage_kv),
    latitude: site.latitude, longitude: site.longitude, accessNotes: site.access_notes, safetyNotes: site.safety_notes, today,
    assets: Number(counts.assets), overdue: Number(counts.overdue), baseline: Number(counts.baseline),
    due30: Number(counts.due30), due90: Number(counts.due90), nextDue: counts.next_due,
    // Findings not closed by a passed verification, on submitted or reviewed surveys.
    openFindings: Number(site.open_findings ?? 0),
    worstBand: (site.worst_band ?? null) as Band | null,
    routes,
    upcoming: upcoming.map((u) => ({ id: u.id, label: u.label, dueOn: u.due_text, baseline: u.baseline, intervalMonths: Number(u.interval_months) })),
  }
}
