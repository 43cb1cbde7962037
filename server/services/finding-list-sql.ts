// The findings list's two queries (the page and its total), built but not run. Plain Kysely with relative imports
// only (no Nitro auto-imports, no path aliases), so scripts/bench/load.bench.ts compiles exactly the SQL and
// parameters the route sends and times it straight against PostgreSQL beside the route itself.
import { sql, type Kysely } from 'kysely'
import type { Database } from '../../db/database'
import { pageWindow } from './paging'

/** The list's filters as the route's schema (findingListQuerySchema) outputs them. */
export interface FindingListFilters {
  page: number
  pageSize: number
  band?: number
  surveyId?: string
  open?: 'true' | 'false'
  counted?: 'true' | 'false'
  siteId?: string
  from?: string
  to?: string
}

/**
 * Past this many findings after the requested page's first row, the list stops counting and says "more than". An
 * exact count of tens of thousands of joined rows cost more than everything else in the request together (see
 * scripts/bench/load.bench.ts); nobody pages through a thousand findings, they narrow the filters.
 */
export const FINDING_COUNT_CAP = 1000

/**
 * The finding's columns an API finding is made of (toFinding and findingExtras in surveys.ts / finding-parts.ts),
 * with its survey and asset. Lists select these rather than every column: each value PostgreSQL turns into text and
 * the server parses back costs time fifty times a page (timestamps most).
 */
export const FINDING_API_COLUMNS = [
  'id', 'check_id', 'survey_id', 'asset_id', 'component', 'phase', 'apparent_c', 'reference_c', 'ambient_c', 'emissivity',
  'reflected_c', 'reflected_method', 'distance_m', 'transmittance', 'window_transmittance', 'window_c', 'load_a', 'rated_a', 'wind_ms',
  'probable_cause', 'cause_notes', 'notes', 'object_c', 'rise_over_reference_k', 'rise_over_ambient_k', 'load_scaled_rise_k', 'band',
  'band_basis', 'action', 'repair_deadline_days', 'uncertainty_low_c', 'uncertainty_high_c', 'warnings', 'criteria_id', 'criteria_version',
  'version', 'reviewed_band', 'review_reason', 'reviewed_by', 'reviewed_at', 'closed_at', 'surface_id',
] as const satisfies ReadonlyArray<keyof Database['findings']>

/**
 * The page of findings (newest survey first, then the most severe band, then the order they were recorded) and the
 * count of the findings the filters match, up to the page's offset + FINDING_COUNT_CAP + 1 (one more than can be
 * shown, so the caller knows there are more). The organisation condition is on every table read (tenant condition
 * inside the WHERE: a list can never show or count another organisation's findings). `timeZone` is the
 * organisation's (organisations.time_zone), needed only with `from` or `to`.
 */
export function findingListQueries(db: Kysely<Database>, orgId: string, q: FindingListFilters, timeZone = 'UTC') {
  // Every filter reads the finding's own row: its survey's date and state, its site and its effective band are kept
  // on it by PostgreSQL (migration 20261205_0100), and one of the findings_list_* indexes returns each filter's
  // findings in the list's order, so the page stops after its rows and the count reads the index alone.
  let base = db.selectFrom('findings as f')
    .where('f.organisation_id', '=', orgId)
    .where('f.survey_archived', '=', false)
  // The reviewed band where there is one, else the computed band (effectiveBandSql in finding-parts.ts).
  if (q.band) base = base.where('f.effective_band', '=', q.band)
  if (q.surveyId) base = base.where('f.survey_id', '=', q.surveyId)
  if (q.siteId) base = base.where('f.site_id', '=', q.siteId)
  // The dashboard's filters (same rules as its figures, server/services/dashboard.ts).
  if (q.open === 'true') {
    base = base.where('f.closed_at', 'is', null).where('f.archived_at', 'is', null).where('f.survey_state', 'in', ['submitted', 'reviewed'])
  }
  if (q.counted === 'true') base = base.where('f.archived_at', 'is', null).where('f.survey_state', 'in', ['submitted', 'reviewed'])
  // Recorded on or after `from` and on or before `to`, in the organisation's time zone: as bounds on created_at
  // itself (local midnight of `from`, local midnight after `to`), so PostgreSQL estimates them from the column's
  // statistics. Same rows as comparing the local date.
  if (q.from) base = base.where(sql<boolean>`f.created_at >= (${q.from}::date::timestamp at time zone ${timeZone})`)
  if (q.to) base = base.where(sql<boolean>`f.created_at < ((${q.to}::date + 1)::timestamp at time zone ${timeZone})`)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  // The page first, then its asset and site names: 50 lookups by key instead of a join PostgreSQL might plan first.
  const ordered = <T extends { orderBy: (...a: any[]) => T }>(query: T): T => query
    .orderBy('f.survey_planned_for', 'desc').orderBy(sql`f.effective_band asc nulls last`).orderBy('f.created_at').orderBy('f.id')
  const page = ordered(base.select(['f.id'])).limit(limit).offset(offset)
  return {
    count: db.selectFrom(base.select(sql<number>`1`.as('one')).limit(offset + FINDING_COUNT_CAP + 1).as('m'))
      .select((eb) => eb.fn.countAll<number>().as('n')),
    /** Rows beyond this are not counted: a count above it means "more than countCap". */
    countCap: offset + FINDING_COUNT_CAP,
    rows: ordered(db.selectFrom(page.as('p'))
      .innerJoin('findings as f', (j) => j.on('f.organisation_id', '=', orgId).onRef('f.id', '=', 'p.id'))
      .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'f.organisation_id').onRef('a.id', '=', 'f.asset_id'))
      .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
      .select(FINDING_API_COLUMNS.map((c) => `f.${c}` as const)).select(['a.label as asset_label', 'si.name as site_name'])
      // The reviewer's name (reviewerNameSql in finding-parts.ts): users are global, the id comes from the tenant's row.
      .select(sql<string | null>`(select u.name from users u where u.id = f.reviewed_by)`.as('reviewer_name'))
      .select(sql<string>`to_char(f.survey_planned_for, 'YYYY-MM-DD')`.as('planned_for'))),
  }
}
