// The programme dashboard: every figure is one aggregate query in PostgreSQL, each with the organisation condition
// on every table it reads (tenant condition inside the WHERE: a figure can never count another organisation's rows).
// The definitions the page shows beside each figure are in shared/dashboard.ts (FIGURE_DEFINITIONS).
import { sql, type RawBuilder } from 'kysely'
import type { z } from 'zod'
import { AGE_BUCKETS, BACKLOG_STATES, COVERAGE_SITES_SHOWN, OVERDUE_SITES_SHOWN, defaultFrom, worstCovered, type AgeBucketKey, type BacklogState } from '#shared/dashboard'
import type { dashboardCoverageQuerySchema, dashboardQuerySchema, dashboardRepeatQuerySchema, dashboardVerificationQuerySchema } from '#shared/schemas/dashboard'
import type { AgeCounts, CoverageAssetRow, CoverageCounts, DashboardFigures, RepeatComponentRow, VerificationRow } from '#shared/types/dashboard'
import type { Page } from '#shared/types/programme'
import { assetScheduleInputsSql, dueSql } from './schedule-sql'
import { pageWindow } from './paging'
import { programmeSettings } from './programme-settings'

type Band = 1 | 2 | 3 | 4
type Filters = Pick<z.output<typeof dashboardQuerySchema>, 'from' | 'to' | 'site'>

/** The resolved filters: period (defaults to the 12 months to today), sites, the organisation's today and time zone. */
interface Scope {
  orgId: string
  from: string
  to: string
  today: string
  timeZone: string
  siteIds: string[]
}

async function scopeOf(ctx: MemberContext, q: Filters): Promise<Scope> {
  const { today, timeZone } = await programmeSettings(ctx.org.id)
  const to = q.to ?? (q.from && q.from > today ? q.from : today)
  return { orgId: ctx.org.id, from: q.from ?? defaultFrom(to), to, today, timeZone, siteIds: q.site }
}

/** `and <column> = any(sites)` when sites were chosen, nothing otherwise. */
function siteCondition(column: RawBuilder<unknown>, s: Scope) {
  return s.siteIds.length ? sql`and ${column} = any(${s.siteIds}::uuid[])` : sql``
}

const n = (v: unknown) => Number(v ?? 0)
const ratio = (a: number, b: number) => (b > 0 ? a / b : null)

/** `count(*) filter (...)` per age bucket of an integer age column. */
function ageBucketColumns(age: RawBuilder<unknown>) {
  return sql.join(AGE_BUCKETS.map((b) => (b.max === null
    ? sql`count(*) filter (where ${age} >= ${b.min}::int) as ${sql.ref(b.key)}`
    : sql`count(*) filter (where ${age} between ${b.min}::int and ${b.max}::int) as ${sql.ref(b.key)}`)))
}
function agesOf(row: Record<string, unknown>): AgeCounts {
  return Object.fromEntries(AGE_BUCKETS.map((b) => [b.key, n(row[b.key])])) as Record<AgeBucketKey, number>
}

// The same rules as the Due screen (schedule-sql.ts): a check counts when it is clear or a finding on a survey
// handed in or reviewed and not archived, dated by the day it was recorded in the organisation's time zone; a
// check "not reached" lists the asset as inaccessible, it does not cover it. Findings count on those surveys too.
const COUNTED_SURVEY_STATES = sql`('submitted', 'reviewed')`

/** The local date of a timestamptz column. */
function localDate(column: RawBuilder<unknown>, s: Scope) {
  return sql`(${column} at time zone ${s.timeZone})::date`
}

function countedChecks(s: Scope) {
  return sql`select c.asset_id, ${localDate(sql.ref('c.created_at'), s)} as on_date
    from checks c
    join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
    where c.organisation_id = ${s.orgId} and sv.organisation_id = ${s.orgId}
      and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null and c.outcome in ('clear', 'finding')`
}

/**
 * Every active asset in scope with its due date as it stood at the start of the period (the Due screen's rule,
 * dueSql, fed with the last counted check before the period and the worst finding open then) and its first counted
 * check in the period. Assets never checked before the period are due by the period end.
 */
function coverageRows(s: Scope) {
  const from = sql`${s.from}::date`
  const to = sql`${s.to}::date`
  const due = dueSql({
    condition: sql.ref('b.condition'),
    assetIntervalMonths: sql.ref('b.interval_months'),
    lastCheckedOn: sql.ref('b.last_before'),
    openFindingBand: sql.ref('b.band_at_start'),
    normalMonths: sql.ref('b.interval_months_normal'),
    condition3Months: sql.ref('b.interval_months_condition3'),
    monitorBands: sql.ref('b.monitor_bands'),
    monitorFactor: sql.ref('b.monitor_factor'),
    today: from,
  })
  // One pass over the organisation's checks and findings, grouped per asset, then joined: no per-asset subquery.
  return sql`
    with ck as (
      select cc.asset_id,
        max(cc.on_date) filter (where cc.on_date < ${from}) as last_before,
        min(cc.on_date) filter (where cc.on_date between ${from} and ${to}) as first_in
      from (${countedChecks(s)}) cc
      group by cc.asset_id
    ),
    -- As openFindingBandSql, on the eve of the period, for the part dueSql reads: a monitor band when a finding open
    -- then is in one, else null (dueSql only asks whether the band is a monitor band), so only those findings are read.
    fo as (
      select c.asset_id, min(x.eb)::smallint as band_at_start
      from findings f
      join checks c on c.organisation_id = f.organisation_id and c.id = f.check_id
      join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
      cross join lateral (select coalesce(f.reviewed_band, f.band) as eb) x
      where f.organisation_id = ${s.orgId} and c.organisation_id = ${s.orgId} and sv.organisation_id = ${s.orgId}
        and coalesce(f.reviewed_band, f.band) = any((select o2.monitor_bands from organisations o2 where o2.id = ${s.orgId})::smallint[])
        and ${localDate(sql.ref('f.created_at'), s)} < ${from}
        and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null and f.archived_at is null
        and (f.closed_at is null or ${localDate(sql.ref('f.closed_at'), s)} >= ${from})
      group by c.asset_id
    ),
    b as (
      select a.id, a.label, a.asset_class, a.site_id, si.code as site_code, si.name as site_name,
        a.condition, a.interval_months, o.interval_months_normal, o.interval_months_condition3, o.monitor_bands, o.monitor_factor,
        ck.last_before, ck.first_in, fo.band_at_start
      from assets a
      join organisations o on o.id = a.organisation_id
      join sites si on si.organisation_id = a.organisation_id and si.id = a.site_id
      left join ck on ck.asset_id = a.id
      left join fo on fo.asset_id = a.id
      where a.organisation_id = ${s.orgId} and o.id = ${s.orgId} and si.organisation_id = ${s.orgId}
        and a.archived_at is null and si.archived_at is null ${siteCondition(sql.ref('a.site_id'), s)}
    ),
    d as (
      select b.*, ${due.baseline} as baseline, case when ${due.baseline} then ${to} else ${due.dueOn} end as due_by
      from b
    )
    select d.*, case when d.first_in is null then 'missed' when d.first_in <= d.due_by then 'on_time' else 'late' end as status
    from d
    where d.due_by <= ${to}`
}

function coverageCounts(r: Record<string, unknown>): CoverageCounts {
  const due = n(r.due)
  const onTime = n(r.on_time)
  return { due, onTime, late: n(r.late), missed: n(r.missed), rate: ratio(onTime, due) }
}

async function coverage(s: Scope): Promise<DashboardFigures['coverage']> {
  const { rows } = await sql<Record<string, unknown>>`
    with x as (${coverageRows(s)})
    select x.site_id, min(x.site_code) as code, min(x.site_name) as name, count(*) as due,
      count(*) filter (where x.status = 'on_time') as on_time,
      count(*) filter (where x.status = 'late') as late,
      count(*) filter (where x.status = 'missed') as missed
    from x group by x.site_id order by min(x.site_code) nulls last, min(x.site_name), x.site_id`.execute(useDb())
  const sum = (k: string) => rows.reduce((t, r) => t + n(r[k]), 0)
  const sites = rows.map((r) => ({ siteId: String(r.site_id), code: (r.code as string | null) ?? null, name: String(r.name), ...coverageCounts(r) }))
  return {
    ...coverageCounts({ due: sum('due'), on_time: sum('on_time'), late: sum('late'), missed: sum('missed') }),
    siteCount: sites.length,
    sites: worstCovered(sites, COVERAGE_SITES_SHOWN),
  }
}

/**
 * Overdue today, by the Due screen's rules (dueSql) over the same joins as the Due screen, with its per-asset inputs
 * (last counted check, open finding in a monitor band) computed for the whole organisation in one grouped pass each
 * (assetScheduleInputsSql) rather than as subqueries per asset: the same figures, without 100 000 × 3 lookups.
 */
async function overdue(s: Scope): Promise<DashboardFigures['overdue']> {
  const inputs = assetScheduleInputsSql(s.orgId, s.timeZone)
  const d = dueSql({
    condition: sql.ref('a.condition'),
    assetIntervalMonths: sql.ref('a.interval_months'),
    lastCheckedOn: sql.ref('ck.last_checked_on'),
    openFindingBand: sql.ref('fo.monitor_band'),
    normalMonths: sql.ref('o.interval_months_normal'),
    condition3Months: sql.ref('o.interval_months_condition3'),
    monitorBands: sql.ref('o.monitor_bands'),
    monitorFactor: sql.ref('o.monitor_factor'),
    today: sql`${s.today}::date`,
  })
  const { rows } = await sql<Record<string, unknown>>`
    with due as (
      select a.id, a.site_id, s.code, s.name, ${d.dueOn} as due_on
      from assets a
      join organisations o on o.id = a.organisation_id
      join sites s on s.organisation_id = a.organisation_id and s.id = a.site_id
      left join (${inputs.lastChecked}) ck on ck.asset_id = a.id
      left join (${inputs.monitorBand}) fo on fo.asset_id = a.id
      where a.organisation_id = ${s.orgId} and o.id = ${s.orgId} and s.organisation_id = ${s.orgId}
        and a.archived_at is null and s.archived_at is null ${siteCondition(sql.ref('a.site_id'), s)}
    )
    select site_id, min(code) as code, min(name) as name, count(*) as assets
    from due where due_on < ${s.today}::date
    group by site_id order by count(*) desc, min(code) nulls last, min(name), site_id`.execute(useDb())
  return {
    assets: rows.reduce((t, r) => t + n(r.assets), 0),
    sites: rows.length,
    // Most overdue first; the dashboard names the first few, the Due screen has them all.
    bySite: rows.slice(0, OVERDUE_SITES_SHOWN)
      .map((r) => ({ siteId: String(r.site_id), code: (r.code as string | null) ?? null, name: String(r.name), assets: n(r.assets) })),
  }
}

/** Findings joined to their check, survey and asset, all under the organisation condition. */
function findingsJoin(s: Scope) {
  return sql`findings f
    join checks c on c.organisation_id = f.organisation_id and c.id = f.check_id
    join surveys sv on sv.organisation_id = c.organisation_id and sv.id = c.survey_id
    join assets a on a.organisation_id = c.organisation_id and a.id = c.asset_id`
}
function findingsWhere(s: Scope) {
  return sql`f.organisation_id = ${s.orgId} and c.organisation_id = ${s.orgId} and sv.organisation_id = ${s.orgId} and a.organisation_id = ${s.orgId}
    and f.archived_at is null and sv.state in ${COUNTED_SURVEY_STATES} and sv.archived_at is null ${siteCondition(sql.ref('a.site_id'), s)}`
}
/** The day a finding was recorded, in the organisation's time zone. */
const foundOn = (s: Scope) => localDate(sql.ref('f.created_at'), s)

async function openFindings(s: Scope): Promise<DashboardFigures['openFindings']> {
  const age = sql`(${s.today}::date - ${foundOn(s)})`
  const { rows } = await sql<Record<string, unknown>>`
    select coalesce(f.reviewed_band, f.band) as band, count(*) as total, ${ageBucketColumns(age)}
    from ${findingsJoin(s)}
    where ${findingsWhere(s)} and f.closed_at is null
    group by 1 order by 1 nulls last`.execute(useDb())
  return {
    total: rows.reduce((t, r) => t + n(r.total), 0),
    byBand: rows.map((r) => ({ band: (r.band === null ? null : Number(r.band)) as Band | null, total: n(r.total), ages: agesOf(r) })),
  }
}

// Assets checked: the assets join only serves the site filter (checks_asset_fkey guarantees the asset), so without
// one it is left out — 190 000 index probes fewer on the large organisation.
async function findingsPer100(s: Scope): Promise<DashboardFigures['findingsPer100']> {
  const { rows: [r] } = await sql<Record<string, unknown>>`
    select
      (select count(*) from ${findingsJoin(s)} where ${findingsWhere(s)} and ${foundOn(s)} between ${s.from}::date and ${s.to}::date) as findings,
      (select count(distinct cc.asset_id) from (${countedChecks(s)}) cc
         ${s.siteIds.length ? sql`join assets a on a.organisation_id = ${s.orgId} and a.id = cc.asset_id` : sql``}
        where cc.on_date between ${s.from}::date and ${s.to}::date ${siteCondition(sql.ref('a.site_id'), s)}) as assets_checked`.execute(useDb())
  const findings = n(r?.findings)
  const assetsChecked = n(r?.assets_checked)
  const rate = ratio(findings * 100, assetsChecked)
  return { findings, assetsChecked, rate }
}

/**
 * Findings up to the period end, numbered per component (asset, trimmed lower-case component and phase) in the order
 * they were found; number 2 and later are repeats.
 */
function numberedFindings(s: Scope) {
  return sql`select f.id, c.asset_id, a.label as asset_label, a.site_id, lower(btrim(f.component)) as comp_key, lower(btrim(f.phase)) as phase_key,
      f.component, f.phase, ${foundOn(s)} as found_on, coalesce(f.reviewed_band, f.band) as band,
      row_number() over (partition by c.asset_id, lower(btrim(f.component)), lower(btrim(f.phase)) order by f.created_at, f.id) as nth
    from ${findingsJoin(s)}
    where ${findingsWhere(s)} and ${foundOn(s)} <= ${s.to}::date`
}

async function repeats(s: Scope): Promise<DashboardFigures['repeats']> {
  const { rows: [r] } = await sql<Record<string, unknown>>`
    with nf as (${numberedFindings(s)})
    select count(*) as findings, count(distinct (asset_id, comp_key, phase_key)) as components
    from nf where nth > 1 and found_on >= ${s.from}::date`.execute(useDb())
  return { findings: n(r?.findings), components: n(r?.components) }
}

async function workOrderFigures(s: Scope): Promise<DashboardFigures['workOrders']> {
  const db = useDb()
  // The work-order tables arrive with their own migration; until it ran the dashboard shows the other figures.
  const { rows: [exists] } = await sql<{ ok: boolean }>`select to_regclass('verifications') is not null and to_regclass('work_orders') is not null as ok`.execute(db)
  if (!exists?.ok) return null
  const from = sql`${s.from}::date`
  const to = sql`${s.to}::date`
  const age = sql`(${s.today}::date - ${localDate(sql.ref('w.created_at'), s)})`
  const [ageing, repair, verification] = await Promise.all([
    sql<Record<string, unknown>>`
      select w.state, count(*) as total, ${ageBucketColumns(age)}
      from work_orders w
      where w.organisation_id = ${s.orgId} and w.archived_at is null and w.state = any(${[...BACKLOG_STATES]}::text[])
        ${siteCondition(sql.ref('w.site_id'), s)}
      group by w.state`.execute(db),
    sql<Record<string, unknown>>`
      with pv as (
        select v.finding_id, min(${localDate(sql.ref('v.recorded_at'), s)}) as verified_on
        from verifications v
        where v.organisation_id = ${s.orgId} and v.state = 'passed'
        group by v.finding_id
      )
      select coalesce(f.reviewed_band, f.band) as band, count(*) as repaired,
        percentile_cont(0.5) within group (order by (pv.verified_on - ${foundOn(s)})) as median_days
      from ${findingsJoin(s)} join pv on pv.finding_id = f.id
      where ${findingsWhere(s)} and pv.verified_on between ${from} and ${to}
      group by 1 order by 1 nulls last`.execute(db),
    sql<Record<string, unknown>>`
      select count(*) filter (where v.state = 'passed') as passed, count(*) filter (where v.state = 'failed') as failed
      from verifications v
      where v.organisation_id = ${s.orgId} and v.state in ('passed', 'failed')
        and ${localDate(sql.ref('v.recorded_at'), s)} between ${from} and ${to}
        ${siteCondition(sql.ref('v.site_id'), s)}`.execute(db),
  ])
  const byState = new Map(ageing.rows.map((r) => [String(r.state), r]))
  const passed = n(verification.rows[0]?.passed)
  const failed = n(verification.rows[0]?.failed)
  return {
    backlog: ageing.rows.reduce((t, r) => t + n(r.total), 0),
    ageing: BACKLOG_STATES.map((state: BacklogState) => {
      const r = byState.get(state) ?? {}
      return { state, total: n(r.total), ages: agesOf(r) }
    }),
    timeToRepair: repair.rows.map((r) => ({
      band: (r.band === null ? null : Number(r.band)) as Band | null,
      repaired: n(r.repaired),
      medianDays: r.median_days === null ? null : Number(r.median_days),
    })),
    verification: { recorded: passed + failed, passed, failed, rate: ratio(passed, passed + failed) },
  }
}

/** Every dashboard figure for the period and sites chosen. */
export async function dashboardFigures(ctx: MemberContext, q: Filters): Promise<DashboardFigures> {
  const s = await scopeOf(ctx, q)
  const [cov, over, open, per100, rep, wo] = await Promise.all([
    coverage(s), overdue(s), openFindings(s), findingsPer100(s), repeats(s), workOrderFigures(s),
  ])
  return {
    today: s.today, from: s.from, to: s.to, siteIds: s.siteIds,
    coverage: cov, overdue: over, openFindings: open, findingsPer100: per100, repeats: rep, workOrders: wo,
  }
}

const isoDate = (e: RawBuilder<unknown>) => sql`to_char(${e}, 'YYYY-MM-DD')`

/** The assets behind the coverage figure, missed first, then late, then on time; paginated. */
export async function coverageAssets(ctx: MemberContext, q: z.output<typeof dashboardCoverageQuerySchema>): Promise<Page<CoverageAssetRow> & { from: string; to: string }> {
  const s = await scopeOf(ctx, q)
  const status = q.status === 'all' ? sql`` : sql`where x.status = ${q.status}`
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const db = useDb()
  const [count, items] = await Promise.all([
    sql<{ n: string }>`with x as (${coverageRows(s)}) select count(*) as n from x ${status}`.execute(db),
    sql<Record<string, unknown>>`
      with x as (${coverageRows(s)})
      select x.id, x.label, x.asset_class, x.site_id, x.site_code, x.site_name, x.status, x.baseline,
        ${isoDate(sql.ref('x.due_by'))} as due_text, ${isoDate(sql.ref('x.last_before'))} as last_text, ${isoDate(sql.ref('x.first_in'))} as first_text
      from x ${status}
      order by case x.status when 'missed' then 0 when 'late' then 1 else 2 end, x.site_code nulls last, x.site_name, x.label, x.id
      limit ${limit} offset ${offset}`.execute(db),
  ])
  return {
    from: s.from, to: s.to,
    items: items.rows.map((r) => ({
      id: String(r.id), label: String(r.label), assetClass: String(r.asset_class), siteId: String(r.site_id),
      siteCode: (r.site_code as string | null) ?? null, siteName: String(r.site_name),
      dueOn: r.baseline ? null : (r.due_text as string), lastBefore: (r.last_text as string | null) ?? null,
      firstCheckedOn: (r.first_text as string | null) ?? null, status: r.status as CoverageAssetRow['status'],
    })),
    total: n(count.rows[0]?.n), page: q.page, pageSize: q.pageSize,
  }
}

/** The components behind the repeat-finding figure, most findings first; paginated. */
export async function repeatComponents(ctx: MemberContext, q: z.output<typeof dashboardRepeatQuerySchema>): Promise<Page<RepeatComponentRow> & { from: string; to: string }> {
  const s = await scopeOf(ctx, q)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const db = useDb()
  const grouped = sql`
    with nf as (${numberedFindings(s)}),
    g as (
      select asset_id, comp_key, phase_key, min(asset_label) as asset_label, min(site_id::text)::uuid as site_id,
        count(*) as findings, count(*) filter (where nth > 1 and found_on >= ${s.from}::date) as repeats_in_period,
        min(found_on) as first_on, max(found_on) as last_on,
        (array_agg(band order by nth desc))[1] as last_band,
        (array_agg(component order by nth desc))[1] as component, (array_agg(phase order by nth desc))[1] as phase
      from nf group by asset_id, comp_key, phase_key
    )`
  const [count, items] = await Promise.all([
    sql<{ n: string }>`${grouped} select count(*) as n from g where repeats_in_period > 0`.execute(db),
    sql<Record<string, unknown>>`${grouped}
      select g.*, si.name as site_name, ${isoDate(sql.ref('g.first_on'))} as first_text, ${isoDate(sql.ref('g.last_on'))} as last_text
      from g join sites si on si.organisation_id = ${s.orgId} and si.id = g.site_id
      where g.repeats_in_period > 0
      order by g.findings desc, g.last_on desc, g.asset_label, g.comp_key, g.phase_key
      limit ${limit} offset ${offset}`.execute(db),
  ])
  return {
    from: s.from, to: s.to,
    items: items.rows.map((r) => ({
      assetId: String(r.asset_id), assetLabel: String(r.asset_label), siteId: String(r.site_id), siteName: String(r.site_name),
      component: String(r.component), phase: String(r.phase), findings: n(r.findings), repeatsInPeriod: n(r.repeats_in_period),
      firstFoundOn: String(r.first_text), lastFoundOn: String(r.last_text),
      lastBand: (r.last_band === null ? null : Number(r.last_band)) as Band | null,
    })),
    total: n(count.rows[0]?.n), page: q.page, pageSize: q.pageSize,
  }
}

/** The re-scans behind the repair and verification figures, newest first; paginated. */
export async function verificationList(ctx: MemberContext, q: z.output<typeof dashboardVerificationQuerySchema>): Promise<Page<VerificationRow> & { from: string; to: string }> {
  const s = await scopeOf(ctx, q)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const db = useDb()
  const recordedOn = localDate(sql.ref('v.recorded_at'), s)
  const rows = sql`
    with vr as (
      select v.id, v.state as result, ${recordedOn} as recorded_on, v.recorded_at, v.work_order_id, f.id as finding_id, f.component, f.phase,
        coalesce(f.reviewed_band, f.band) as band, ${foundOn(s)} as found_on, a.id as asset_id, a.label as asset_label, si.name as site_name,
        w.number as work_order_number,
        v.state = 'passed' and not exists (
          select 1 from verifications p
          where p.organisation_id = ${s.orgId} and p.finding_id = v.finding_id and p.state = 'passed'
            and (p.recorded_at, p.id) < (v.recorded_at, v.id)) as first_pass
      from ${findingsJoin(s)}
      join verifications v on v.organisation_id = f.organisation_id and v.finding_id = f.id
      join sites si on si.organisation_id = a.organisation_id and si.id = a.site_id
      join work_orders w on w.organisation_id = v.organisation_id and w.id = v.work_order_id
      where v.organisation_id = ${s.orgId} and si.organisation_id = ${s.orgId} and w.organisation_id = ${s.orgId}
        and ${findingsWhere(s)} and v.state in ('passed', 'failed') and ${recordedOn} between ${s.from}::date and ${s.to}::date
    )
    select * from vr where true
      ${q.result === 'all' ? sql`` : sql`and vr.result = ${q.result}`}
      ${q.band ? sql`and vr.band = ${q.band}` : sql``}
      ${q.firstPass === 'true' ? sql`and vr.first_pass` : sql``}`
  const [count, items] = await Promise.all([
    sql<{ n: string }>`select count(*) as n from (${rows}) x`.execute(db),
    sql<Record<string, unknown>>`select x.*, ${isoDate(sql.ref('x.recorded_on'))} as recorded_text, ${isoDate(sql.ref('x.found_on'))} as found_text
      from (${rows}) x order by x.recorded_at desc, x.id limit ${limit} offset ${offset}`.execute(db),
  ])
  return {
    from: s.from, to: s.to,
    items: items.rows.map((r) => ({
      id: String(r.id), result: r.result as VerificationRow['result'], recordedOn: String(r.recorded_text),
      findingId: String(r.finding_id), component: String(r.component), phase: String(r.phase),
      band: (r.band === null ? null : Number(r.band)) as Band | null, foundOn: String(r.found_text),
      assetId: String(r.asset_id), assetLabel: String(r.asset_label), siteName: String(r.site_name),
      workOrderId: String(r.work_order_id), workOrderNumber: n(r.work_order_number), firstPass: Boolean(r.first_pass),
      days: Math.round((Date.parse(String(r.recorded_text)) - Date.parse(String(r.found_text))) / 86_400_000),
    })),
    total: n(count.rows[0]?.n), page: q.page, pageSize: q.pageSize,
  }
}
