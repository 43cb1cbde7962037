// Work orders: raised by a manager from open findings of one site, worked by the crew, closed only by a passed
// verification. Every change writes a timeline entry (record_events) in the same transaction; nothing is deleted.
import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import { changesOf, record } from './audit'
import type { FindingRow } from '~~/db/tables/findings'
import type { ReadingWarning } from '#shared/thermal/index'
import { can, type Role } from '#shared/permissions'
import { todayIn } from '#shared/schedule'
import {
  ACTIVE_WORK_ORDER_STATES,
  CANCELLABLE_STATES,
  DEFERRABLE_STATES,
  WORK_ORDER_MOVES,
  type WorkOrderListQuery,
  type WorkOrderStateName,
  type repairDeadlinesUpdateSchema,
  type workOrderCancelSchema,
  type workOrderDeferSchema,
  type workOrderMoveSchema,
  type workOrderRaiseSchema,
  type workOrderUpdateSchema,
  type workOrderWorkSchema,
} from '#shared/schemas/work-order'
import type {
  PersonRef,
  RaiseCandidateSite,
  ReadingSummary,
  RepairDeadlines,
  TimelineEntry,
  WorkOrderDetail,
  WorkOrderFindingItem,
  WorkOrderListItem,
  WorkOrderPeople,
} from '#shared/types/work-order'
import type { Page } from '#shared/types/programme'
import { isOverdue, mostSevereBand, repairDueOn, workOrderReference } from '#shared/work-orders'
import { changedMeanwhile, likePattern, pageWindow } from './paging'
import { notify } from './notices'
import { recordEvent, timeline } from './record-events'
import { listVerificationsOf, requestVerifications, withdrawWaiting } from './verifications'

type Db = ReturnType<typeof useDb> | Transaction<Database>

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

// ---------------------------------------------------------------------------------------------------------------
// Settings

export interface WorkOrderSettings extends RepairDeadlines {
  timeZone: string
  today: string
}

/** The organisation's repair deadlines per band and today's date in its time zone. */
export async function workOrderSettings(db: Db, orgId: string): Promise<WorkOrderSettings> {
  const o = await db.selectFrom('organisations')
    .select(['time_zone', 'repair_days_band1', 'repair_days_band2', 'repair_days_band3', 'repair_days_band4'])
    .where('id', '=', orgId).executeTakeFirstOrThrow()
  return {
    timeZone: o.time_zone,
    today: todayIn(o.time_zone),
    repairDaysBand1: o.repair_days_band1,
    repairDaysBand2: o.repair_days_band2,
    repairDaysBand3: o.repair_days_band3,
    repairDaysBand4: o.repair_days_band4,
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Findings as a work order carries them

/** The effective band of a finding: a manager's correction when there is one, else the engine's. */
export const effectiveBandSql = sql<number | null>`coalesce(f.reviewed_band, f.band)`

export function findingQuery(db: Db, orgId: string) {
  return db.selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'c.organisation_id').onRef('a.id', '=', 'c.asset_id'))
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
    .selectAll('f')
    .select(['c.asset_id', 'a.label as asset_label', 's.id as survey_id', 'a.site_id', 'si.code as site_code', 'si.name as site_name', 'si.latitude', 'si.longitude'])
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('surveyed_on'))
    .select(effectiveBandSql.as('effective_band'))
    .where('f.organisation_id', '=', orgId)
}
type FindingQueryRow = FindingRow & {
  asset_id: string; asset_label: string; survey_id: string; site_id: string; site_code: string; site_name: string
  latitude: number | null; longitude: number | null; surveyed_on: string; effective_band: number | null
}

export function readingOf(f: {
  apparent_c: number | null; reference_c: number | null; ambient_c: number | null; emissivity: number | null; reflected_c: number | null
  reflected_method: string | null; distance_m: number | null; load_a: number | null; rated_a: number | null; wind_ms: number | null
  object_c: number | null; rise_over_reference_k: number | null; rise_over_ambient_k: number | null; load_scaled_rise_k: number | null
  band: number | null; band_basis: string | null; uncertainty_low_c: number | null; uncertainty_high_c: number | null
  warnings: unknown; criteria_id: string | null; criteria_version: number | null
}): ReadingSummary {
  return {
    apparentC: f.apparent_c!, referenceC: f.reference_c, ambientC: f.ambient_c, emissivity: f.emissivity!, reflectedC: f.reflected_c!,
    reflectedMethod: f.reflected_method ?? '', distanceM: f.distance_m, loadA: f.load_a, ratedA: f.rated_a, windMs: f.wind_ms,
    objectC: f.object_c!, riseOverReferenceK: f.rise_over_reference_k, riseOverAmbientK: f.rise_over_ambient_k, loadScaledRiseK: f.load_scaled_rise_k,
    band: f.band, bandBasis: f.band_basis, uncertaintyLowC: f.uncertainty_low_c, uncertaintyHighC: f.uncertainty_high_c,
    warnings: (f.warnings ?? []) as ReadingWarning[], criteriaId: f.criteria_id ?? '', criteriaVersion: f.criteria_version ?? 0,
  }
}

function toFindingItem(f: FindingQueryRow): WorkOrderFindingItem {
  return {
    id: f.id,
    component: f.component,
    phase: f.phase,
    asset: { id: f.asset_id, label: f.asset_label },
    surveyId: f.survey_id,
    surveyedOn: f.surveyed_on,
    probableCause: f.probable_cause,
    causeNotes: f.cause_notes,
    notes: f.notes,
    action: f.action,
    band: f.band,
    effectiveBand: f.effective_band === null ? null : Number(f.effective_band),
    reading: readingOf(f),
    closedAt: f.closed_at ? f.closed_at.toISOString() : null,
    closedReason: f.closed_reason,
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Lists

const assigneesSql = sql<PersonRef[]>`(select coalesce(json_agg(json_build_object('id', u.id, 'name', u.name) order by u.name), '[]'::json)
  from work_order_assignees wa join users u on u.id = wa.user_id
  where wa.organisation_id = w.organisation_id and wa.work_order_id = w.id)`

function workOrderQuery(db: Db, orgId: string) {
  return db.selectFrom('work_orders as w')
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'w.organisation_id').onRef('si.id', '=', 'w.site_id'))
    .where('w.organisation_id', '=', orgId)
    .where('w.archived_at', 'is', null)
}

function withListColumns(q: ReturnType<typeof workOrderQuery>) {
  return q.select([
    'w.id', 'w.number', 'w.title', 'w.state', 'w.band', 'w.state_reason', 'w.site_id', 'si.code as site_code', 'si.name as site_name',
    'si.latitude', 'si.longitude', 'w.created_at', 'w.updated_at', 'w.version', 'w.instructions', 'w.cause_found', 'w.parts', 'w.work_done',
    'w.time_spent_minutes', 'w.created_by', 'w.closed_at',
  ])
    .select(sql<string | null>`to_char(w.due_on, 'YYYY-MM-DD')`.as('due_on'))
    .select(sql<string | null>`to_char(w.deferred_until, 'YYYY-MM-DD')`.as('deferred_until'))
    .select(assigneesSql.as('assignees'))
    .select((eb) => eb.selectFrom('work_order_findings as wf').whereRef('wf.organisation_id', '=', 'w.organisation_id')
      .whereRef('wf.work_order_id', '=', 'w.id').select(eb.fn.countAll<number>().as('n')).as('finding_count'))
}
type ListRow = Awaited<ReturnType<ReturnType<typeof withListColumns>['executeTakeFirstOrThrow']>>

function toListItem(r: ListRow, today: string): WorkOrderListItem {
  return {
    id: r.id,
    number: r.number,
    reference: workOrderReference(r.number),
    title: r.title,
    state: r.state,
    band: r.band,
    dueOn: r.due_on,
    overdue: isOverdue(r.state, r.due_on, today),
    deferredUntil: r.deferred_until,
    stateReason: r.state_reason,
    site: { id: r.site_id, code: r.site_code, name: r.site_name, latitude: r.latitude, longitude: r.longitude },
    assignees: r.assignees ?? [],
    findingCount: Number(r.finding_count ?? 0),
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
    version: r.version,
  }
}

/**
 * The work orders matching the list filters, before columns, sorting and paging: the list, the CSV export and the
 * dashboard build on it so all three count the same rows.
 */
export function filteredWorkOrders(db: Db, ctx: MemberContext, q: Omit<WorkOrderListQuery, 'page' | 'pageSize' | 'sort'>, today: string) {
  let query = workOrderQuery(db, ctx.org.id)
  if (q.state === 'active') query = query.where('w.state', 'in', [...ACTIVE_WORK_ORDER_STATES])
  else if (q.state) query = query.where('w.state', '=', q.state)
  if (q.band) query = query.where('w.band', '=', q.band)
  if (q.siteId) query = query.where('w.site_id', '=', q.siteId)
  const assignee = q.mine ? ctx.user.id : q.assigneeId
  if (assignee) {
    query = query.where((eb) => eb.exists(eb.selectFrom('work_order_assignees as wa').select('wa.user_id')
      .whereRef('wa.organisation_id', '=', 'w.organisation_id').whereRef('wa.work_order_id', '=', 'w.id').where('wa.user_id', '=', assignee)))
  }
  if (q.overdue) query = query.where('w.due_on', '<', today as never).where('w.state', 'in', ['open', 'planned', 'in_repair', 'deferred'])
  if (q.q) {
    const text = q.q
    const n = /^(?:wo-?)?(\d{1,9})$/i.exec(text)?.[1]
    const pattern = likePattern(text)
    query = query.where((eb) => eb.or([
      eb('w.title', 'ilike', pattern),
      eb('si.name', 'ilike', pattern),
      eb('si.code', 'ilike', pattern),
      ...(n ? [eb('w.number', '=', Number(n))] : []),
    ]))
  }
  return query
}

/** Work orders of the organisation, filtered, sorted and paginated on the server. */
export async function listWorkOrders(ctx: MemberContext, q: WorkOrderListQuery): Promise<Page<WorkOrderListItem>> {
  const db = useDb()
  const { today } = await workOrderSettings(db, ctx.org.id)
  const base = filteredWorkOrders(db, ctx, q, today)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  let rows = withListColumns(base)
  if (q.sort === 'due') rows = rows.orderBy(sql`w.due_on asc nulls last`).orderBy(sql`w.band asc nulls last`)
  else if (q.sort === 'band') rows = rows.orderBy(sql`w.band asc nulls last`).orderBy(sql`w.due_on asc nulls last`)
  else if (q.sort === 'updated') rows = rows.orderBy('w.updated_at', 'desc')
  const [count, items] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    rows.orderBy('w.number', 'desc').limit(limit).offset(offset).execute(),
  ])
  return { items: items.map((r) => toListItem(r, today)), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

/** Open findings not in an active work order, grouped by site (optionally one site): what a manager raises from. */
export async function raiseCandidates(ctx: MemberContext, siteId?: string): Promise<RaiseCandidateSite[]> {
  let q = findingQuery(useDb(), ctx.org.id)
    .where('f.closed_at', 'is', null).where('f.archived_at', 'is', null).where('s.archived_at', 'is', null)
    .where((eb) => eb.not(eb.exists(eb.selectFrom('work_order_findings as wf')
      .innerJoin('work_orders as w', (j) => j.onRef('w.organisation_id', '=', 'wf.organisation_id').onRef('w.id', '=', 'wf.work_order_id'))
      .select('wf.id').whereRef('wf.organisation_id', '=', 'f.organisation_id').whereRef('wf.finding_id', '=', 'f.id')
      .where('w.state', 'in', [...ACTIVE_WORK_ORDER_STATES]))))
  if (siteId) q = q.where('a.site_id', '=', siteId)
  const rows = await q.orderBy('si.name').orderBy(sql`coalesce(f.reviewed_band, f.band) asc nulls last`).orderBy('f.created_at').limit(500).execute()
  const bySite = new Map<string, RaiseCandidateSite>()
  for (const r of rows as FindingQueryRow[]) {
    const entry = bySite.get(r.site_id) ?? { site: { id: r.site_id, code: r.site_code, name: r.site_name, latitude: r.latitude, longitude: r.longitude }, findings: [] }
    entry.findings.push(toFindingItem(r))
    bySite.set(r.site_id, entry)
  }
  return [...bySite.values()]
}

/** Members the pages offer for assigning: crew (and managers, owners) for repairs, thermographers for verifications. */
export async function workOrderPeople(ctx: MemberContext): Promise<WorkOrderPeople> {
  const rows = await useDb().selectFrom('memberships as m').innerJoin('users as u', 'u.id', 'm.user_id')
    .select(['u.id', 'u.name', 'm.role'])
    .where('m.organisation_id', '=', ctx.org.id).where('m.removed_at', 'is', null).orderBy('u.name').execute()
  return {
    crew: rows.filter((r) => can(r.role, 'workorders.work')).map((r) => ({ id: r.id, name: r.name, role: r.role })),
    thermographers: rows.filter((r) => can(r.role, 'verifications.record')).map((r) => ({ id: r.id, name: r.name, role: r.role })),
  }
}

// ---------------------------------------------------------------------------------------------------------------
// One work order

/** One work order with its findings, verifications and timeline; 404 when not this organisation's. */
export async function getWorkOrder(ctx: MemberContext, id: string, db: Db = useDb()): Promise<WorkOrderDetail> {
  const { today } = await workOrderSettings(db, ctx.org.id)
  const row = await withListColumns(workOrderQuery(db, ctx.org.id)).where('w.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Work order')
  const [findings, creator, verifications] = await Promise.all([
    findingQuery(db, ctx.org.id)
      .innerJoin('work_order_findings as wf', (j) => j.onRef('wf.organisation_id', '=', 'f.organisation_id').onRef('wf.finding_id', '=', 'f.id'))
      .where('wf.work_order_id', '=', id)
      .orderBy(sql`coalesce(f.reviewed_band, f.band) asc nulls last`).orderBy('f.created_at').execute(),
    row.created_by ? db.selectFrom('users').select(['id', 'name']).where('id', '=', row.created_by).executeTakeFirst() : undefined,
    listVerificationsOf(db, ctx.org.id, { workOrderId: id }),
  ])
  const list = toListItem(row, today)
  return {
    ...list,
    instructions: row.instructions,
    causeFound: row.cause_found,
    parts: row.parts,
    workDone: row.work_done,
    timeSpentMinutes: row.time_spent_minutes,
    createdBy: creator ? { id: creator.id, name: creator.name } : null,
    closedAt: row.closed_at ? row.closed_at.toISOString() : null,
    findings: (findings as FindingQueryRow[]).map(toFindingItem),
    verifications,
    timeline: await timeline(db, ctx.org.id, { workOrderId: id, findingIds: findings.map((f) => f.id) }),
    assignedToMe: list.assignees.some((a) => a.id === ctx.user.id),
  }
}

/** Looks the work order up before the body is read, so an id from elsewhere is a 404 whatever the body holds. */
export async function assertWorkOrderExists(ctx: MemberContext, id: string): Promise<void> {
  const row = await useDb().selectFrom('work_orders').select('id')
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null).executeTakeFirst()
  if (!row) throw notFound('Work order')
}

async function lockWorkOrder(trx: Db, ctx: MemberContext, id: string) {
  const row = await trx.selectFrom('work_orders')
    .select(['id', 'number', 'title', 'state', 'band', 'version', 'site_id'])
    .select(sql<string | null>`to_char(due_on, 'YYYY-MM-DD')`.as('due_on'))
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null)
    .forUpdate().executeTakeFirst()
  if (!row) throw notFound('Work order')
  return row
}
export type LockedWorkOrder = Awaited<ReturnType<typeof lockWorkOrder>>
export { lockWorkOrder }

async function assigneeIdsOf(trx: Db, orgId: string, workOrderId: string): Promise<string[]> {
  const rows = await trx.selectFrom('work_order_assignees').select('user_id')
    .where('organisation_id', '=', orgId).where('work_order_id', '=', workOrderId).execute()
  return rows.map((r) => r.user_id)
}

// Crew work only on the orders they are assigned to; owners and managers may work any.
async function assertMayWork(trx: Db, ctx: MemberContext, workOrderId: string) {
  if (ctx.member.role === 'owner' || ctx.member.role === 'manager') return
  // A read-write API token moves any work order of its organisation (requireMember lets it make no other write).
  if (ctx.token?.scope === 'read_write') return
  const ids = await assigneeIdsOf(trx, ctx.org.id, workOrderId)
  if (!ids.includes(ctx.user.id)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Not your work order',
      data: { message: 'Only the crew assigned to this work order (or a manager) can work on it.' },
    })
  }
}

async function bump(trx: Db, ctx: MemberContext, id: string, set: Record<string, unknown>) {
  await trx.updateTable('work_orders').set({ ...set, version: sql`version + 1`, updated_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
}

/** Checks the chosen people are current members who may work repairs; returns their names, in order. */
async function checkAssignees(trx: Db, ctx: MemberContext, ids: string[]): Promise<PersonRef[]> {
  if (!ids.length) return []
  const rows = await trx.selectFrom('memberships as m').innerJoin('users as u', 'u.id', 'm.user_id')
    .select(['u.id', 'u.name', 'm.role'])
    .where('m.organisation_id', '=', ctx.org.id).where('m.user_id', 'in', ids).where('m.removed_at', 'is', null).execute()
  if (rows.length !== ids.length || rows.some((r) => !can(r.role as Role, 'workorders.work'))) {
    fieldError('assigneeIds', 'Choose crew members (or managers) of this organisation.')
  }
  return rows.sort((a, b) => a.name.localeCompare(b.name)).map((r) => ({ id: r.id, name: r.name }))
}

async function setAssignees(trx: Db, ctx: MemberContext, workOrderId: string, people: PersonRef[]) {
  await trx.deleteFrom('work_order_assignees').where('organisation_id', '=', ctx.org.id).where('work_order_id', '=', workOrderId).execute()
  if (people.length) {
    await trx.insertInto('work_order_assignees')
      .values(people.map((p) => ({ organisation_id: ctx.org.id, work_order_id: workOrderId, user_id: p.id }))).execute()
  }
}

async function tellAssigned(trx: Db, ctx: MemberContext, wo: { id: string; number: number; title: string }, people: PersonRef[], dueOn: string | null) {
  if (!people.length) return
  await notify(trx, {
    organisationId: ctx.org.id,
    userIds: people.map((p) => p.id),
    kind: 'work_order_assigned',
    title: `${workOrderReference(wo.number)} is yours: ${wo.title}`,
    body: `${ctx.user.name} assigned you to ${workOrderReference(wo.number)}.${dueOn ? ` It is due on ${dueOn}.` : ''} Open it to read the findings and instructions.`,
    link: `/orgs/${ctx.org.slug}/work-orders/${wo.id}`,
    dedupeKey: `work_order_assigned:${wo.id}:${Date.now()}`,
  })
}

/** Raises a work order from open findings of one site; the due date comes from the most severe band's deadline. */
export async function raiseWorkOrder(ctx: MemberContext, input: z.output<typeof workOrderRaiseSchema>): Promise<WorkOrderDetail> {
  const id = await useDb().transaction().execute(async (trx) => {
    const settings = await workOrderSettings(trx, ctx.org.id)
    const findings = await findingQuery(trx, ctx.org.id).where('f.id', 'in', input.findingIds).where('s.archived_at', 'is', null).execute() as FindingQueryRow[]
    if (findings.length !== input.findingIds.length) fieldError('findingIds', 'Some of the chosen findings were not found.')
    if (new Set(findings.map((f) => f.site_id)).size > 1) fieldError('findingIds', 'A work order covers findings of one site: raise one per site.')
    const shut = findings.find((f) => f.closed_at || f.archived_at)
    if (shut) fieldError('findingIds', `The finding on ${shut.asset_label} (${shut.component}) is already closed.`)
    const taken = await trx.selectFrom('work_order_findings as wf')
      .innerJoin('work_orders as w', (j) => j.onRef('w.organisation_id', '=', 'wf.organisation_id').onRef('w.id', '=', 'wf.work_order_id'))
      .select(['w.number', 'wf.finding_id'])
      .where('wf.organisation_id', '=', ctx.org.id).where('wf.finding_id', 'in', input.findingIds)
      .where('w.state', 'in', [...ACTIVE_WORK_ORDER_STATES]).executeTakeFirst()
    if (taken) fieldError('findingIds', `One of the findings is already on ${workOrderReference(taken.number)}.`, 409)
    const people = await checkAssignees(trx, ctx, input.assigneeIds ?? [])
    const band = mostSevereBand(findings.map((f) => (f.effective_band === null ? null : Number(f.effective_band))))
    const dueOn = input.dueOn !== undefined ? input.dueOn : repairDueOn([band], settings, settings.today)
    const counter = await trx.updateTable('organisations').set({ work_order_counter: sql`work_order_counter + 1` })
      .where('id', '=', ctx.org.id).returning('work_order_counter').executeTakeFirstOrThrow()
    const first = findings[0]!
    const title = input.title ?? `${first.site_name}: ${findings.length === 1 ? `${first.asset_label}, ${first.component}` : `${findings.length} findings`}`
    const wo = await trx.insertInto('work_orders').values({
      organisation_id: ctx.org.id, site_id: first.site_id, number: counter.work_order_counter, title: title.slice(0, 160),
      instructions: input.instructions ?? '', band, due_on: dueOn, time_spent_minutes: null, created_by: ctx.user.id,
      closed_at: null, archived_at: null,
    }).returning(['id', 'number', 'title']).executeTakeFirstOrThrow()
    await trx.insertInto('work_order_findings')
      .values(findings.map((f) => ({ organisation_id: ctx.org.id, work_order_id: wo.id, finding_id: f.id }))).execute()
    await setAssignees(trx, ctx, wo.id, people)
    const reference = workOrderReference(wo.number)
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: wo.id, workOrderId: wo.id, actorId: ctx.user.id, action: 'raised',
      details: { reference, findingCount: findings.length, band, dueOn, dueFrom: input.dueOn !== undefined ? 'chosen' : 'band deadline' },
    })
    for (const f of findings) {
      await recordEvent(trx, {
        organisationId: ctx.org.id, subjectKind: 'finding', subjectId: f.id, workOrderId: wo.id, actorId: ctx.user.id, action: 'raised',
        details: { reference, findingCount: findings.length, dueOn },
      })
    }
    if (people.length) {
      await recordEvent(trx, {
        organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: wo.id, workOrderId: wo.id, actorId: ctx.user.id, action: 'assigned',
        details: { names: people.map((p) => p.name), userIds: people.map((p) => p.id) },
      })
    }
    await tellAssigned(trx, ctx, wo, people, dueOn)
    return wo.id
  })
  return getWorkOrder(ctx, id)
}

/** A manager's edit: title, instructions, due date, crew. */
export async function updateWorkOrder(ctx: MemberContext, id: string, input: z.output<typeof workOrderUpdateSchema>): Promise<WorkOrderDetail> {
  await useDb().transaction().execute(async (trx) => {
    const wo = await lockWorkOrder(trx, ctx, id)
    if (wo.version !== input.version) throw changedMeanwhile('work order')
    if (wo.state === 'closed' || wo.state === 'cancelled') conflict('A closed or cancelled work order is kept as it was.')
    const set: Record<string, unknown> = {}
    const fields: string[] = []
    if (input.title !== undefined && input.title !== wo.title) { set.title = input.title; fields.push('title') }
    if (input.instructions !== undefined) { set.instructions = input.instructions; fields.push('instructions') }
    if (input.dueOn !== undefined && input.dueOn !== wo.due_on) { set.due_on = input.dueOn; fields.push('due date') }
    if (input.assigneeIds) {
      const before = await assigneeIdsOf(trx, ctx.org.id, id)
      const people = await checkAssignees(trx, ctx, input.assigneeIds)
      const same = before.length === people.length && people.every((p) => before.includes(p.id))
      if (!same) {
        await setAssignees(trx, ctx, id, people)
        await recordEvent(trx, {
          organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'assigned',
          details: { names: people.map((p) => p.name), userIds: people.map((p) => p.id) },
        })
        await tellAssigned(trx, ctx, wo, people.filter((p) => !before.includes(p.id)), (set.due_on as string | null | undefined) ?? wo.due_on)
      }
    }
    if (fields.length) {
      await recordEvent(trx, {
        organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'edited',
        details: { fields, ...(set.due_on !== undefined && { dueOn: set.due_on, previousDueOn: wo.due_on }) },
      })
    }
    await bump(trx, ctx, id, set)
  })
  return getWorkOrder(ctx, id)
}

/** Moves a work order along (open ⇄ planned → in repair → awaiting verification); the last creates verification tasks. */
export async function moveWorkOrder(ctx: MemberContext, id: string, input: z.output<typeof workOrderMoveSchema>): Promise<WorkOrderDetail> {
  await useDb().transaction().execute(async (trx) => {
    const wo = await lockWorkOrder(trx, ctx, id)
    await assertMayWork(trx, ctx, id)
    if (wo.version !== input.version) throw changedMeanwhile('work order')
    const allowed = WORK_ORDER_MOVES[wo.state as WorkOrderStateName]
    if (!allowed.includes(input.to)) {
      conflict(allowed.length
        ? `From ${wo.state.replace('_', ' ')} the work order can go to: ${allowed.map((s) => s.replace('_', ' ')).join(', ')}.`
        : `A work order that is ${wo.state.replace('_', ' ')} cannot be moved this way.`)
    }
    const set: Record<string, unknown> = { state: input.to }
    if (wo.state === 'deferred') set.deferred_until = null
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'state_changed',
      reason: input.note ?? '', details: { from: wo.state, to: input.to },
    })
    if (input.to === 'awaiting_verification') {
      const open = await requestVerifications(trx, ctx, wo, input.thermographerId ?? null)
      // Every finding already verified (a sibling failed before): nothing left to re-scan, the order is done.
      if (!open) await closeWorkOrder(trx, ctx, id)
      else await bump(trx, ctx, id, set)
      return
    }
    await bump(trx, ctx, id, set)
  })
  return getWorkOrder(ctx, id)
}

/** Records what the crew did: cause found, parts, work done, time spent. */
export async function recordWork(ctx: MemberContext, id: string, input: z.output<typeof workOrderWorkSchema>): Promise<WorkOrderDetail> {
  await useDb().transaction().execute(async (trx) => {
    const wo = await lockWorkOrder(trx, ctx, id)
    await assertMayWork(trx, ctx, id)
    if (wo.version !== input.version) throw changedMeanwhile('work order')
    if (wo.state === 'closed' || wo.state === 'cancelled') conflict('A closed or cancelled work order is kept as it was.')
    const set: Record<string, unknown> = {}
    if (input.causeFound !== undefined) set.cause_found = input.causeFound
    if (input.parts !== undefined) set.parts = input.parts
    if (input.workDone !== undefined) set.work_done = input.workDone
    if (input.timeSpentMinutes !== undefined) set.time_spent_minutes = input.timeSpentMinutes
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'work_recorded',
      details: { causeFound: input.causeFound, parts: input.parts, workDone: input.workDone, timeSpentMinutes: input.timeSpentMinutes },
    })
    await bump(trx, ctx, id, set)
  })
  return getWorkOrder(ctx, id)
}

/** Defers a work order to a new date, with the reason; the new date becomes its due date. */
export async function deferWorkOrder(ctx: MemberContext, id: string, input: z.output<typeof workOrderDeferSchema>): Promise<WorkOrderDetail> {
  await useDb().transaction().execute(async (trx) => {
    const wo = await lockWorkOrder(trx, ctx, id)
    await assertMayWork(trx, ctx, id)
    if (wo.version !== input.version) throw changedMeanwhile('work order')
    if (!DEFERRABLE_STATES.includes(wo.state as WorkOrderStateName)) conflict('Only an open, planned or in-repair work order can be deferred.')
    const { today } = await workOrderSettings(trx, ctx.org.id)
    if (input.until <= today) fieldError('until', 'Choose a date after today.')
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'deferred',
      reason: input.reason, details: { from: wo.state, until: input.until, previousDueOn: wo.due_on },
    })
    await bump(trx, ctx, id, { state: 'deferred', deferred_until: input.until, due_on: input.until, state_reason: input.reason })
  })
  return getWorkOrder(ctx, id)
}

/** A manager cancels a work order, with the reason; waiting verifications are withdrawn. The findings stay open. */
export async function cancelWorkOrder(ctx: MemberContext, id: string, input: z.output<typeof workOrderCancelSchema>): Promise<WorkOrderDetail> {
  await useDb().transaction().execute(async (trx) => {
    const wo = await lockWorkOrder(trx, ctx, id)
    if (wo.version !== input.version) throw changedMeanwhile('work order')
    if (!CANCELLABLE_STATES.includes(wo.state as WorkOrderStateName)) conflict('This work order is already closed or cancelled.')
    await withdrawWaiting(trx, ctx, id, 'The work order was cancelled.')
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'cancelled',
      reason: input.reason, details: { from: wo.state },
    })
    await bump(trx, ctx, id, { state: 'cancelled', state_reason: input.reason, deferred_until: null })
    await record(trx, { ctx, action: 'work_order.cancelled', target: { kind: 'work_order', id, label: `${workOrderReference(wo.number)} · ${wo.title}` }, details: { from: wo.state, reason: input.reason } })
  })
  return getWorkOrder(ctx, id)
}

/** Closes a work order whose findings are all verified (called inside the verification's transaction). */
export async function closeWorkOrder(trx: Db, ctx: MemberContext, id: string): Promise<void> {
  await recordEvent(trx, {
    organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: id, workOrderId: id, actorId: ctx.user.id, action: 'closed', details: {},
  })
  await bump(trx, ctx, id, { state: 'closed', closed_at: new Date(), deferred_until: null, state_reason: '' })
}

/**
 * Sends a work order back to open after a re-scan that still ranks: the band becomes the most severe of the latest
 * readings of its open findings, the due date the earlier of the old one and the new band's deadline; everyone
 * assigned is told.
 */
export async function reopenWorkOrder(
  trx: Db,
  ctx: MemberContext,
  wo: LockedWorkOrder,
  failed: { verificationId: string; band: number; component: string; objectC: number },
): Promise<void> {
  const settings = await workOrderSettings(trx, ctx.org.id)
  const latest = await trx.selectFrom('work_order_findings as wf')
    .innerJoin('findings as f', (j) => j.onRef('f.organisation_id', '=', 'wf.organisation_id').onRef('f.id', '=', 'wf.finding_id'))
    .select(['f.id'])
    .select(sql<number | null>`coalesce((select v.band from verifications v where v.organisation_id = f.organisation_id and v.finding_id = f.id
      and v.state in ('passed', 'failed') order by v.recorded_at desc limit 1), f.reviewed_band, f.band)`.as('band'))
    .where('wf.organisation_id', '=', ctx.org.id).where('wf.work_order_id', '=', wo.id).where('f.closed_at', 'is', null)
    .execute()
  const band = mostSevereBand(latest.map((r) => (r.band === null ? null : Number(r.band))))
  const newDue = repairDueOn([band], settings, settings.today)
  const dueOn = newDue && (!wo.due_on || newDue < wo.due_on) ? newDue : wo.due_on
  const reason = `The re-scan of ${failed.component} still ranks band ${failed.band}.`
  await recordEvent(trx, {
    organisationId: ctx.org.id, subjectKind: 'work_order', subjectId: wo.id, workOrderId: wo.id, actorId: ctx.user.id, action: 'reopened',
    reason, details: { band: failed.band, verificationId: failed.verificationId, objectC: failed.objectC, dueOn, previousDueOn: wo.due_on },
  })
  await bump(trx, ctx, wo.id, { state: 'open', band, due_on: dueOn, state_reason: reason })
  const assigned = await assigneeIdsOf(trx, ctx.org.id, wo.id)
  await notify(trx, {
    organisationId: ctx.org.id,
    userIds: assigned,
    kind: 'work_order_reopened',
    title: `${workOrderReference(wo.number)} is open again: the repair did not hold`,
    body: `${ctx.user.name} re-scanned ${failed.component} and it still ranks band ${failed.band} (${failed.objectC.toFixed(1)} °C).\n\n`
      + `${workOrderReference(wo.number)} (${wo.title}) is open again${dueOn ? ` and due on ${dueOn}` : ''}. The new reading is attached to it.`,
    link: `/orgs/${ctx.org.slug}/work-orders/${wo.id}`,
    dedupeKey: `work_order_reopened:${wo.id}:${failed.verificationId}`,
  })
}

// ---------------------------------------------------------------------------------------------------------------
// Repair deadlines (organisation settings) and a finding's own timeline

/** The organisation's repair deadlines per band, with the organisation's version for the settings form. */
export async function repairDeadlinesOf(ctx: MemberContext): Promise<RepairDeadlines & { version: number }> {
  const s = await workOrderSettings(useDb(), ctx.org.id)
  const o = await useDb().selectFrom('organisations').select('version').where('id', '=', ctx.org.id).executeTakeFirstOrThrow()
  return { repairDaysBand1: s.repairDaysBand1, repairDaysBand2: s.repairDaysBand2, repairDaysBand3: s.repairDaysBand3, repairDaysBand4: s.repairDaysBand4, version: o.version }
}

/** Changes the repair deadlines (owners); work orders already raised keep their due dates. */
export async function updateRepairDeadlines(ctx: MemberContext, input: z.output<typeof repairDeadlinesUpdateSchema>): Promise<RepairDeadlines & { version: number }> {
  const set: Record<string, number | null> = {}
  if (input.repairDaysBand1 !== undefined) set.repair_days_band1 = input.repairDaysBand1
  if (input.repairDaysBand2 !== undefined) set.repair_days_band2 = input.repairDaysBand2
  if (input.repairDaysBand3 !== undefined) set.repair_days_band3 = input.repairDaysBand3
  if (input.repairDaysBand4 !== undefined) set.repair_days_band4 = input.repairDaysBand4
  const row = await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('organisations').select(['repair_days_band1', 'repair_days_band2', 'repair_days_band3', 'repair_days_band4'])
      .where('id', '=', ctx.org.id).where('version', '=', input.version).forUpdate().executeTakeFirst()
    if (!before) return undefined
    const updated = await trx.updateTable('organisations').set({ ...set, version: sql`version + 1`, updated_at: new Date() })
      .where('id', '=', ctx.org.id).where('version', '=', input.version).returning('id').executeTakeFirst()
    const changes = changesOf(before as Record<string, unknown>, set)
    if (updated && Object.keys(changes).length) {
      await record(trx, { ctx, action: 'organisation.repair_deadlines_changed', target: { kind: 'organisation', id: ctx.org.id, label: ctx.org.name }, details: { changes } })
    }
    return updated
  })
  if (!row) throw changedMeanwhile('organisation')
  return repairDeadlinesOf(ctx)
}

/** Every timeline entry of one finding (raised on, closed as verified, and what other screens record for it). */
export async function findingTimeline(ctx: MemberContext, findingId: string): Promise<TimelineEntry[]> {
  const db = useDb()
  const f = await db.selectFrom('findings').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', findingId).executeTakeFirst()
  if (!f) throw notFound('Finding')
  return timeline(db, ctx.org.id, { subjectKind: 'finding', subjectId: findingId })
}

/** 404 unless the work order is this organisation's; 403 unless the person may work on it. Returns its state. */
export async function mayWorkOn(ctx: MemberContext, workOrderId: string): Promise<WorkOrderStateName> {
  const db = useDb()
  const row = await db.selectFrom('work_orders').select('state')
    .where('organisation_id', '=', ctx.org.id).where('id', '=', workOrderId).where('archived_at', 'is', null).executeTakeFirst()
  if (!row) throw notFound('Work order')
  await assertMayWork(db, ctx, workOrderId)
  return row.state
}
