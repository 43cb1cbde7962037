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

/**
 * Where the schedule's inputs come from for an asset aliased `a` in an organisation aliased `o`. Checks and
 * findings arrive with a later feature: it replaces these two expressions with subqueries on its tables.
 */
export function assetDueSql(today: string) {
  return dueSql({
    condition: sql.ref('a.condition'),
    assetIntervalMonths: sql.ref('a.interval_months'),
    lastCheckedOn: sql`null::date`,
    openFindingBand: sql`null::smallint`,
    normalMonths: sql.ref('o.interval_months_normal'),
    condition3Months: sql.ref('o.interval_months_condition3'),
    monitorBands: sql.ref('o.monitor_bands'),
    monitorFactor: sql.ref('o.monitor_factor'),
    today: sql`${today}::date`,
  })
}

/** Worst open band of a site aliased `s`; null until findings exist (a later feature supplies the subquery). */
export function siteWorstBandSql() {
  return sql<number | null>`null::smallint`
}
