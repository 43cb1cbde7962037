// The daily notice jobs and the run claims that make several app instances fire each run once.
import { hostname } from 'node:os'
import { randomUUID } from 'node:crypto'
import { sql, type Kysely } from 'kysely'
import type { Database } from '~~/db/database'
import { todayIn } from '#shared/schedule'
import {
  CALIBRATION_DUE_WITHIN_DAYS,
  SURVEY_DUE_WITHIN_DAYS,
  WORK_ORDER_DUE_WITHIN_DAYS,
} from '#shared/notices'
import { workOrderReference } from '#shared/work-orders'
import { notify } from './notices'

/** This process, as written in job_runs.claimed_by. */
export const INSTANCE_ID = `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`

/** A claim older than this without finished_at is taken to be from a crashed instance and may be taken over. */
const STALE_CLAIM = '1 hour'

/**
 * Claims one run of a job: true only for the one caller whose insert of (job, slot) happened.
 * Every instance computes the same slot for the same scheduled moment, so exactly one of them runs it.
 */
export async function claimRun(db: Kysely<Database>, job: string, slot: string, by = INSTANCE_ID): Promise<boolean> {
  const row = await db.insertInto('job_runs')
    .values({ job, slot, claimed_by: by })
    .onConflict((oc) => oc.columns(['job', 'slot']).doUpdateSet({ claimed_by: by, claimed_at: sql`now()` } as never)
      .where('job_runs.finished_at', 'is', null)
      .where('job_runs.claimed_at', '<', sql<Date>`now() - ${sql.lit(STALE_CLAIM)}::interval`))
    .returning('job')
    .executeTakeFirst()
  return !!row
}

export async function finishRun(db: Kysely<Database>, job: string, slot: string, summary?: Record<string, unknown>): Promise<void> {
  await db.updateTable('job_runs').set({ finished_at: new Date(), summary: summary ? JSON.stringify(summary) : null })
    .where('job', '=', job).where('slot', '=', slot).execute()
}

/** Forgets finished claims older than 35 days (any instance may do it; the slots are long past). Uses the database clock. */
export async function pruneJobRuns(db: Kysely<Database>): Promise<number> {
  const r = await db.deleteFrom('job_runs').where('finished_at', 'is not', null)
    .where('claimed_at', '<', sql<Date>`now() - interval '35 days'`).executeTakeFirst()
  return Number(r.numDeletedRows)
}

/** Local hour from which an organisation's daily notices go out (its own time zone). */
export function noticeHour(): number {
  const h = Number(process.env.NUXT_NOTICES_HOUR ?? 7)
  return Number.isInteger(h) && h >= 0 && h <= 23 ? h : 7
}

function localHour(timeZone: string, now: Date): number {
  try {
    const h = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', hourCycle: 'h23' }).format(now)
    return Number(h)
  } catch {
    return now.getUTCHours()
  }
}

/** Adds days to a YYYY-MM-DD date. */
function addDays(day: string, n: number): string {
  const d = new Date(`${day}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() + n)
  return d.toISOString().slice(0, 10)
}

function longDate(day: string): string {
  return new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', { weekday: 'short', day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })
}

function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000)
}

function inDays(today: string, day: string): string {
  const n = daysBetween(today, day)
  if (n === 0) return 'today'
  if (n === 1) return 'tomorrow'
  if (n > 1) return `in ${n} days`
  return n === -1 ? 'yesterday' : `${-n} days ago`
}

export interface OrgRunSummary {
  organisationId: string
  localDate: string
  surveys: number
  workOrders: number
  verifications: number
  calibrations: number
  noticesAdded: number
  emailsQueued: number
}

export interface NoticeJobsResult {
  now: string
  /** Organisations whose daily run this call claimed and ran. */
  ran: OrgRunSummary[]
  /** Organisations skipped because another run (or instance) already did today's, or it is before the local hour. */
  skipped: number
}

interface OrgInfo { id: string; slug: string; name: string; time_zone: string }

async function tableExists(db: Kysely<Database>, name: string): Promise<boolean> {
  const r = await sql<{ t: string | null }>`select to_regclass(${`public.${name}`})::text as t`.execute(db)
  return !!r.rows[0]?.t
}

async function managersOf(db: Kysely<Database>, orgId: string): Promise<string[]> {
  const rows = await db.selectFrom('memberships').select('user_id')
    .where('organisation_id', '=', orgId).where('role', 'in', ['owner', 'manager']).where('removed_at', 'is', null).execute()
  return rows.map((r) => r.user_id)
}

/**
 * The daily notices of every organisation whose local time has reached the notice hour and whose run for its
 * local date has not been claimed yet. `now` is injectable so tests can move the clock.
 * Each organisation-day is claimed in job_runs ('notices-daily', '<org id>/<local date>'); every notice carries a
 * dedupe key, so even a run repeated on another day notifies each person of each event once.
 */
export async function runNoticeJobs(db: Kysely<Database>, now: Date = new Date(), opts: { organisationIds?: string[] } = {}): Promise<NoticeJobsResult> {
  let q = db.selectFrom('organisations').select(['id', 'slug', 'name', 'time_zone'])
  if (opts.organisationIds?.length) q = q.where('id', 'in', opts.organisationIds)
  const orgs = await q.orderBy('id').execute()
  const hour = noticeHour()
  const due = orgs.map((o) => ({ org: o, day: todayIn(o.time_zone, now) })).filter(({ org }) => localHour(org.time_zone, now) >= hour)
  const result: NoticeJobsResult = { now: now.toISOString(), ran: [], skipped: orgs.length - due.length }
  if (!due.length) return result
  const slots = due.map(({ org, day }) => `${org.id}/${day}`)
  const taken = new Set((await db.selectFrom('job_runs').select('slot').where('job', '=', 'notices-daily')
    .where('slot', 'in', slots).where('finished_at', 'is not', null).execute()).map((r) => r.slot))
  const hasWorkOrders = await tableExists(db, 'work_orders')
  const hasVerifications = hasWorkOrders && await tableExists(db, 'verifications')
  for (const { org, day } of due) {
    const slot = `${org.id}/${day}`
    if (taken.has(slot) || !(await claimRun(db, 'notices-daily', slot))) {
      result.skipped++
      continue
    }
    const summary = await dailyNoticesFor(db, org, day, { hasWorkOrders, hasVerifications })
    await finishRun(db, 'notices-daily', slot, summary as unknown as Record<string, unknown>)
    result.ran.push(summary)
  }
  return result
}

/** One organisation's daily notices for its local date `today`. */
export async function dailyNoticesFor(
  db: Kysely<Database>,
  org: OrgInfo,
  today: string,
  has: { hasWorkOrders: boolean; hasVerifications: boolean },
): Promise<OrgRunSummary> {
  const s: OrgRunSummary = { organisationId: org.id, localDate: today, surveys: 0, workOrders: 0, verifications: 0, calibrations: 0, noticesAdded: 0, emailsQueued: 0 }
  const managers = await managersOf(db, org.id)
  const base = `/orgs/${org.slug}`
  const count = (r: { added: number; queued: number }) => { s.noticesAdded += r.added; s.emailsQueued += r.queued }

  // Surveys planned within the window or already past their date, not yet submitted.
  const surveys = await sql<{ id: string; planned_for: string; thermographer_id: string; route_name: string | null; sites: number }>`
    select s.id, to_char(s.planned_for, 'YYYY-MM-DD') as planned_for, s.thermographer_id, r.name as route_name,
      (select count(*) from survey_sites ss where ss.organisation_id = s.organisation_id and ss.survey_id = s.id)::int as sites
    from surveys s
    left join routes r on r.organisation_id = s.organisation_id and r.id = s.route_id
    where s.organisation_id = ${org.id} and s.archived_at is null and s.state in ('planned', 'in_progress')
      and s.planned_for <= ${addDays(today, SURVEY_DUE_WITHIN_DAYS)}::date
    order by s.planned_for, s.id`.execute(db)
  for (const r of surveys.rows) {
    const overdue = r.planned_for < today
    const what = r.route_name ? `the ${r.route_name} survey` : 'an ad-hoc survey'
    const sites = `${r.sites} site${r.sites === 1 ? '' : 's'}`
    count(await notify(db, {
      organisationId: org.id,
      userIds: [r.thermographer_id, ...managers],
      kind: overdue ? 'survey_overdue' : 'survey_due',
      title: overdue
        ? `Overdue: ${what} was planned for ${longDate(r.planned_for)}`
        : `Coming up: ${what} on ${longDate(r.planned_for)}`,
      body: overdue
        ? `This survey (${sites}) was planned for ${inDays(today, r.planned_for)} and has not been submitted yet. Start it, finish it, or move its date so the programme shows the real plan.`
        : `This survey (${sites}) is planned ${inDays(today, r.planned_for)}. Check the instrument and the route before heading out.`,
      link: `${base}/surveys/${r.id}`,
      dedupeKey: `${overdue ? 'survey_overdue' : 'survey_due'}:${r.id}:${r.planned_for}`,
    }))
    s.surveys++
  }

  if (has.hasWorkOrders) {
    // Open work orders due within the window or past due; a deferred one counts from its new date.
    const orders = await sql<{ id: string; number: number; title: string; due: string; site_name: string; assignees: string[] }>`
      select w.id, w.number, w.title, to_char(coalesce(case when w.state = 'deferred' then w.deferred_until end, w.due_on), 'YYYY-MM-DD') as due,
        si.name as site_name,
        coalesce((select array_agg(a.user_id) from work_order_assignees a
          where a.organisation_id = w.organisation_id and a.work_order_id = w.id), '{}') as assignees
      from work_orders w
      join sites si on si.organisation_id = w.organisation_id and si.id = w.site_id
      where w.organisation_id = ${org.id} and w.archived_at is null
        and w.state in ('open', 'planned', 'in_repair', 'deferred')
        and coalesce(case when w.state = 'deferred' then w.deferred_until end, w.due_on) <= ${addDays(today, WORK_ORDER_DUE_WITHIN_DAYS)}::date
      order by 4, w.number`.execute(db)
    for (const r of orders.rows) {
      const overdue = r.due < today
      count(await notify(db, {
        organisationId: org.id,
        userIds: [...r.assignees, ...managers],
        kind: overdue ? 'work_order_overdue' : 'work_order_due',
        title: overdue
          ? `${workOrderReference(r.number)} at ${r.site_name} is past its due date`
          : `${workOrderReference(r.number)} at ${r.site_name} is due ${inDays(today, r.due)}`,
        body: overdue
          ? `"${r.title}" was due on ${longDate(r.due)}. Record progress, or defer it with a reason and a new date.`
          : `"${r.title}" is due on ${longDate(r.due)}. Plan the repair, or defer it with a reason and a new date if it cannot be done in time.`,
        link: `${base}/work-orders/${r.id}`,
        dedupeKey: `${overdue ? 'work_order_overdue' : 'work_order_due'}:${r.id}:${r.due}`,
      }))
      s.workOrders++
    }
  }

  if (has.hasVerifications) {
    const checks = await sql<{ id: string; work_order_id: string; number: number; thermographer_id: string | null; site_name: string; created: string }>`
      select v.id, v.work_order_id, w.number, v.thermographer_id, si.name as site_name, to_char(v.created_at, 'YYYY-MM-DD') as created
      from verifications v
      join work_orders w on w.organisation_id = v.organisation_id and w.id = v.work_order_id
      join sites si on si.organisation_id = v.organisation_id and si.id = v.site_id
      where v.organisation_id = ${org.id} and v.state = 'waiting'
      order by v.created_at, v.id`.execute(db)
    for (const r of checks.rows) {
      count(await notify(db, {
        organisationId: org.id,
        // The chosen thermographer; when nobody is chosen yet, the managers who assign it.
        userIds: r.thermographer_id ? [r.thermographer_id] : managers,
        kind: 'verification_waiting',
        title: `A repair at ${r.site_name} is waiting for its verification scan`,
        body: `${workOrderReference(r.number)} was repaired and needs a new reading on the same component to prove the repair. ${r.thermographer_id ? 'You are down to take it' : 'Nobody is assigned to take it yet'}; it can be done on the next survey of the site or as a separate visit.`,
        link: `${base}/work-orders/${r.work_order_id}`,
        dedupeKey: `verification_waiting:${r.id}`,
      }))
      s.verifications++
    }
  }

  const instruments = await sql<{ id: string; make: string; model: string; serial: string; due: string }>`
    select i.id, i.make, i.model, i.serial, to_char(i.calibration_due, 'YYYY-MM-DD') as due
    from instruments i
    where i.organisation_id = ${org.id} and i.archived_at is null and i.calibration_due is not null
      and i.calibration_due <= ${addDays(today, CALIBRATION_DUE_WITHIN_DAYS)}::date
    order by i.calibration_due, i.id`.execute(db)
  for (const r of instruments.rows) {
    const past = r.due < today
    const name = `${r.make} ${r.model} (serial ${r.serial})`
    count(await notify(db, {
      organisationId: org.id,
      userIds: managers,
      kind: 'calibration_due',
      title: past ? `Calibration of ${name} has lapsed` : `Calibration of ${name} is due ${inDays(today, r.due)}`,
      body: past
        ? `Its calibration was due on ${longDate(r.due)}. Findings recorded with it carry a warning until a new calibration date is entered.`
        : `Its calibration is due on ${longDate(r.due)}. Book it in, or plan surveys with another imager after that date.`,
      link: `${base}/instruments`,
      dedupeKey: `calibration_due:${r.id}:${r.due}`,
    }))
    s.calibrations++
  }
  return s
}
