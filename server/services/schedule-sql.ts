// The due-date rules of shared/schedule.ts as SQL, so that lists of 100 000 assets are filtered, sorted and
// paginated in PostgreSQL. Plain Kysely only (no Nitro auto-imports): the end-to-end tests evaluate these
// expressions directly and compare them with shared/schedule.ts.
import { sql, type RawBuilder } from 'kysely'

type Expr = RawBuilder<unknown>

/** The SQL inputs of one asset's due date (column references or literals). */
export interface DueSqlInputs {
  condition: Expr
  /** assets.interval_months: the asset's own interval, or null. */
  assetIntervalMonths: Expr
  /** Local date of the last check, or null when never checked. */
  lastCheckedOn: Expr
  /** Band of the worst open finding, or null. */
  openFindingBand: Expr
  normalMonths: Expr
  condition3Months: Expr
  /** smallint[] of the bands that shorten the interval. */
  monitorBands: Expr
  monitorFactor: Expr
  /** Today's date in the organisation's time zone. */
  today: Expr
}

/** SQL expressions for an asset's interval (months and reason), due date and baseline flag. */
export function dueSql(i: DueSqlInputs) {
  const baseMonths = sql<number>`coalesce(${i.assetIntervalMonths}, case when ${i.condition} = 3 then ${i.condition3Months} else ${i.normalMonths} end)`
  const shortened = sql<boolean>`coalesce(${i.openFindingBand} = any(${i.monitorBands}), false)`
  // Same rounding as shared/schedule.ts: down, at least one month.
  const months = sql<number>`(case when ${shortened} then greatest(1, floor(${baseMonths} * ${i.monitorFactor} + 1e-9)) else ${baseMonths} end)::int`
  const reason = sql<'condition' | 'asset override' | 'open finding'>`case when ${shortened} then 'open finding' when ${i.assetIntervalMonths} is not null then 'asset override' else 'condition' end`
  // date + interval clamps the 31st to the end of a shorter month, as addMonths() does.
  const dueOn = sql<string>`(case when ${i.lastCheckedOn} is null then ${i.today} else (${i.lastCheckedOn} + make_interval(months => ${months}))::date end)`
  const baseline = sql<boolean>`(${i.lastCheckedOn} is null)`
  return { months, reason, dueOn, baseline }
}

// Checks that count for the schedule: an asset looked at (clear or finding) on a survey handed in or reviewed.
const COUNTED_SURVEY_STATES = sql`('submitted', 'reviewed')`

/**
 * Local date (organisation `o`'s time zone) of the last check of asset `a`: clear or finding, on a submitted or
 * reviewed survey that is not archived. Not reached does not count as a check.
 */
export function lastCheckedOnSql() {
  return sql<string | null>`(
    select max((c.created_at at time zone o.time_zone)::date)
    from checks c
    join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
    where c.organisation_id = a.organisation_id and c.asset_id = a.id
      and c.outcome in ('clear', 'finding')
      and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null
  )`
}

/** Open findings (not closed, not archived) of submitted or reviewed surveys, with `eb` their effective band. */
function openFindingsFrom(where: RawBuilder<unknown>) {
  return sql`
    from findings f
    join checks c on c.organisation_id = f.organisation_id and c.id = f.check_id
    join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
    cross join lateral (select coalesce(f.reviewed_band, f.band) as eb) x
    where ${where}
      and f.closed_at is null and f.archived_at is null
      and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null`
}

/**
 * The open-finding band that drives asset `a`'s interval: a band that shortens the interval (organisation `o`'s
 * monitor bands) when any open finding is in one, else the worst open band; null without open findings. A
 * reviewed band replaces the computed one.
 */
export function openFindingBandSql() {
  const mine = sql`f.organisation_id = a.organisation_id and c.asset_id = a.id`
  return sql<number | null>`coalesce(
    (select min(x.eb) ${openFindingsFrom(mine)} and x.eb = any(o.monitor_bands)),
    (select min(x.eb) ${openFindingsFrom(mine)})
  )::smallint`
}

/** Where the schedule's inputs come from for an asset aliased `a` in an organisation aliased `o`. */
export function assetDueSql(today: string) {
  const lastCheckedOn = lastCheckedOnSql()
  return {
    ...dueSql({
      condition: sql.ref('a.condition'),
      assetIntervalMonths: sql.ref('a.interval_months'),
      lastCheckedOn,
      openFindingBand: openFindingBandSql(),
      normalMonths: sql.ref('o.interval_months_normal'),
      condition3Months: sql.ref('o.interval_months_condition3'),
      monitorBands: sql.ref('o.monitor_bands'),
      monitorFactor: sql.ref('o.monitor_factor'),
      today: sql`${today}::date`,
    }),
    lastCheckedOn,
  }
}

/** Worst open band (reviewed band first) of the active assets at a site aliased `s`; null without open findings. */
export function siteWorstBandSql() {
  const atSite = sql`f.organisation_id = s.organisation_id and c.asset_id in (
    select a2.id from assets a2 where a2.organisation_id = s.organisation_id and a2.site_id = s.id and a2.archived_at is null)`
  return sql<number | null>`(select min(x.eb) ${openFindingsFrom(atSite)})::smallint`
}

/** How many open findings the active assets at a site aliased `s` hold. */
export function siteOpenFindingsSql() {
  const atSite = sql`f.organisation_id = s.organisation_id and c.asset_id in (
    select a2.id from assets a2 where a2.organisation_id = s.organisation_id and a2.site_id = s.id and a2.archived_at is null)`
  return sql<number>`(select count(*) ${openFindingsFrom(atSite)})::int`
}

/**
 * The due-date inputs of every asset of organisation `orgId` at once, for figures over the whole register: one
 * grouped pass over its checks (`last_checked_on`, as lastCheckedOnSql) and one over its open findings in a monitor
 * band (`monitor_band`), instead of three subqueries per asset (the dashboard reads 100 000 assets). dueSql only
 * asks whether the open-finding band is a monitor band, and openFindingBandSql gives a monitor band exactly when an
 * open finding is in one, so `monitor_band` in its place gives the same due dates while joining only those findings
 * to their checks. Join `left join (...) ck on ck.asset_id = a.id` and
 * `left join (...) fo on fo.asset_id = a.id`; an asset missing from either gets null, as the subqueries give.
 * `timeZone` is the organisation's (organisations.time_zone).
 */
export function assetScheduleInputsSql(orgId: string, timeZone: string) {
  const lastChecked = sql`
    select c.asset_id, max((c.created_at at time zone ${timeZone})::date) as last_checked_on
    from checks c
    join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
    where c.organisation_id = ${orgId} and sv.organisation_id = ${orgId}
      and c.outcome in ('clear', 'finding')
      and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null
    group by c.asset_id`
  const monitorBand = sql`
    select c.asset_id, min(x.eb)::smallint as monitor_band
    ${openFindingsFrom(sql`f.organisation_id = ${orgId} and c.organisation_id = ${orgId} and sv.organisation_id = ${orgId}
      and coalesce(f.reviewed_band, f.band) = any((select o.monitor_bands from organisations o where o.id = ${orgId})::smallint[])`)}
    group by c.asset_id`
  return { lastChecked, monitorBand }
}
