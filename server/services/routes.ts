import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import { calibrationStatus } from '#shared/instruments'
import { routeEstimate, shortestOrder } from '#shared/route-plan'
import type { routeCreateSchema, routeListQuerySchema, routeUpdateSchema } from '#shared/schemas/route'
import type { Page, RouteDetail, RouteListItem, RouteStopItem } from '#shared/types/programme'
import { changedMeanwhile, likePattern, pageWindow } from './paging'
import { programmeSettings, type ProgrammeSettings } from './programme-settings'
import { record } from './audit'

type Db = ReturnType<typeof useDb> | Transaction<Database>

function routeQuery(db: Db, orgId: string) {
  return db.selectFrom('routes as r')
    .leftJoin('users as u', 'u.id', 'r.thermographer_id')
    .leftJoin('memberships as m', (j) => j.onRef('m.organisation_id', '=', 'r.organisation_id').onRef('m.user_id', '=', 'r.thermographer_id'))
    .leftJoin('instruments as i', (j) => j.onRef('i.organisation_id', '=', 'r.organisation_id').onRef('i.id', '=', 'r.instrument_id'))
    .select([
      'r.id', 'r.name', 'r.base_name', 'r.base_latitude', 'r.base_longitude', 'r.recurrence_months', 'r.notes', 'r.archived_at',
      'r.updated_at', 'r.version', 'r.thermographer_id', 'u.name as thermographer_name', 'm.role as thermographer_role',
      'm.removed_at as thermographer_removed_at', 'r.instrument_id', 'i.make', 'i.model', 'i.serial', 'i.archived_at as instrument_archived_at',
    ])
    .select(sql<string | null>`to_char(i.calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .select((eb) => eb.selectFrom('route_stops as rs').whereRef('rs.route_id', '=', 'r.id').select(eb.fn.countAll<number>().as('n')).as('stop_count'))
    .where('r.organisation_id', '=', orgId)
}

type RouteRow = Awaited<ReturnType<ReturnType<typeof routeQuery>['executeTakeFirstOrThrow']>>

async function stopsOf(db: Db, orgId: string, routeIds: string[]) {
  if (!routeIds.length) return new Map<string, RouteStopItem[]>()
  const rows = await db.selectFrom('route_stops as rs')
    .innerJoin('sites as s', (j) => j.onRef('s.organisation_id', '=', 'rs.organisation_id').onRef('s.id', '=', 'rs.site_id'))
    .select(['rs.route_id', 'rs.position', 's.id', 's.code', 's.name', 's.kind', 's.latitude', 's.longitude', 's.archived_at'])
    .where('rs.organisation_id', '=', orgId)
    .where('rs.route_id', 'in', routeIds)
    .orderBy('rs.route_id').orderBy('rs.position')
    .execute()
  const out = new Map<string, RouteStopItem[]>()
  for (const r of rows) {
    const list = out.get(r.route_id) ?? []
    list.push({ siteId: r.id, code: r.code, name: r.name, kind: r.kind, latitude: r.latitude, longitude: r.longitude, archived: r.archived_at !== null })
    out.set(r.route_id, list)
  }
  return out
}

function toListItem(r: RouteRow, stops: RouteStopItem[], settings: ProgrammeSettings): RouteListItem {
  const base = { lat: r.base_latitude, lon: r.base_longitude }
  return {
    id: r.id,
    name: r.name,
    baseName: r.base_name,
    recurrenceMonths: r.recurrence_months,
    stopCount: Number(r.stop_count ?? 0),
    thermographer: r.thermographer_id
      ? { id: r.thermographer_id, name: r.thermographer_name ?? '—', isThermographer: r.thermographer_role === 'thermographer' && !r.thermographer_removed_at }
      : null,
    instrument: r.instrument_id
      ? {
          id: r.instrument_id,
          label: `${r.make} ${r.model} · ${r.serial}`,
          calibrationDue: r.calibration_due,
          calibrationStatus: calibrationStatus(r.calibration_due, settings.today),
          archived: r.instrument_archived_at !== null,
        }
      : null,
    estimate: routeEstimate(base, stops.map((s) => ({ lat: s.latitude, lon: s.longitude })), settings),
    archivedAt: r.archived_at ? r.archived_at.toISOString() : null,
    updatedAt: r.updated_at.toISOString(),
    version: r.version,
  }
}

/** Routes of the organisation with their stop count, assignment and travel estimate, paginated. */
export async function listRoutes(ctx: MemberContext, q: z.output<typeof routeListQuerySchema>): Promise<Page<RouteListItem>> {
  const db = useDb()
  let filter = db.selectFrom('routes as r').where('r.organisation_id', '=', ctx.org.id)
  let query = routeQuery(db, ctx.org.id)
  if (q.status !== 'all') {
    const op = q.status === 'active' ? 'is' : 'is not'
    filter = filter.where('r.archived_at', op, null)
    query = query.where('r.archived_at', op, null)
  }
  if (q.q) {
    const like = likePattern(q.q)
    filter = filter.where((eb) => eb.or([eb('r.name', 'ilike', like), eb('r.base_name', 'ilike', like)]))
    query = query.where((eb) => eb.or([eb('r.name', 'ilike', like), eb('r.base_name', 'ilike', like)]))
  }
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const sorted = q.sort === 'stops' ? query.orderBy('stop_count', 'desc') : q.sort === 'updated' ? query.orderBy('r.updated_at', 'desc') : query
  const [count, rows, settings] = await Promise.all([
    filter.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    sorted.orderBy('r.name').orderBy('r.id').limit(limit).offset(offset).execute(),
    programmeSettings(ctx.org.id),
  ])
  const stops = await stopsOf(db, ctx.org.id, rows.map((r) => r.id))
  return { items: rows.map((r) => toListItem(r, stops.get(r.id) ?? [], settings)), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

/** One route with its stops in order, archived or not; 404 when it is not this organisation's. */
export async function getRoute(ctx: MemberContext, id: string, db: Db = useDb()): Promise<RouteDetail> {
  const [row, settings] = await Promise.all([routeQuery(db, ctx.org.id).where('r.id', '=', id).executeTakeFirst(), programmeSettings(ctx.org.id)])
  if (!row) throw notFound('Route')
  const stops = (await stopsOf(db, ctx.org.id, [id])).get(id) ?? []
  return {
    ...toListItem(row, stops, settings),
    baseLatitude: row.base_latitude,
    baseLongitude: row.base_longitude,
    notes: row.notes,
    stops,
    travel: { roadFactor: settings.roadFactor, averageSpeedKmh: settings.averageSpeedKmh },
  }
}

// The assignment and the stops are checked against this organisation's rows: ids from elsewhere are simply not found.
async function checkRefs(trx: Db, ctx: MemberContext, input: { thermographerId?: string | null; instrumentId?: string | null; siteIds?: string[] }) {
  if (input.thermographerId) {
    const m = await trx.selectFrom('memberships').select('role')
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', input.thermographerId).where('removed_at', 'is', null)
      .executeTakeFirst()
    if (!m || m.role !== 'thermographer') fieldError('thermographerId', 'Choose a member whose role is thermographer.')
  }
  if (input.instrumentId) {
    const i = await trx.selectFrom('instruments').select('id')
      .where('organisation_id', '=', ctx.org.id).where('id', '=', input.instrumentId).where('archived_at', 'is', null)
      .executeTakeFirst()
    if (!i) fieldError('instrumentId', 'Choose an instrument of this organisation that is not archived.')
  }
  if (input.siteIds?.length) {
    const found = await trx.selectFrom('sites').select('id')
      .where('organisation_id', '=', ctx.org.id).where('id', 'in', input.siteIds).where('archived_at', 'is', null)
      .execute()
    if (found.length !== input.siteIds.length) fieldError('siteIds', 'Some of the chosen sites were not found or are archived. Reload the site list and choose again.')
  }
}

async function writeStops(trx: Transaction<Database>, orgId: string, routeId: string, siteIds: string[]) {
  await trx.deleteFrom('route_stops').where('organisation_id', '=', orgId).where('route_id', '=', routeId).execute()
  if (siteIds.length) {
    await trx.insertInto('route_stops')
      .values(siteIds.map((siteId, position) => ({ organisation_id: orgId, route_id: routeId, site_id: siteId, position })))
      .execute()
  }
}

/** Creates a route with its stops in the given order. */
export async function createRoute(ctx: MemberContext, input: z.output<typeof routeCreateSchema>): Promise<RouteDetail> {
  const id = await useDb().transaction().execute(async (trx) => {
    await checkRefs(trx, ctx, input)
    const row = await trx.insertInto('routes').values({
      organisation_id: ctx.org.id, name: input.name, base_name: input.baseName, base_latitude: input.baseLatitude,
      base_longitude: input.baseLongitude, recurrence_months: input.recurrenceMonths, thermographer_id: input.thermographerId ?? null,
      instrument_id: input.instrumentId ?? null, notes: input.notes ?? '', archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    await writeStops(trx, ctx.org.id, row.id, input.siteIds ?? [])
    return row.id
  })
  return getRoute(ctx, id)
}

/** Locks the route row at the expected version; 404 when absent, 409 when someone saved in between. */
async function lockVersion(trx: Transaction<Database>, ctx: MemberContext, id: string, version: number) {
  const row = await trx.selectFrom('routes').select(['version', 'base_latitude', 'base_longitude', 'archived_at', 'thermographer_id', 'instrument_id'])
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).forUpdate().executeTakeFirst()
  if (!row) throw notFound('Route')
  if (row.version !== version) throw changedMeanwhile('route')
  return row
}

/** Changes a route's details and/or its stops (the order given is kept). */
export async function updateRoute(ctx: MemberContext, id: string, input: z.output<typeof routeUpdateSchema>): Promise<RouteDetail> {
  await useDb().transaction().execute(async (trx) => {
    const current = await lockVersion(trx, ctx, id, input.version)
    // An assignment kept as it was is not re-checked: a route may keep an imager archived or a person whose role
    // changed since (both are flagged), and still have its other details edited.
    await checkRefs(trx, ctx, {
      thermographerId: input.thermographerId !== current.thermographer_id ? input.thermographerId : undefined,
      instrumentId: input.instrumentId !== current.instrument_id ? input.instrumentId : undefined,
      siteIds: input.siteIds,
    })
    const set = changedColumns(input, {
      name: 'name', baseName: 'base_name', baseLatitude: 'base_latitude', baseLongitude: 'base_longitude',
      recurrenceMonths: 'recurrence_months', thermographerId: 'thermographer_id', instrumentId: 'instrument_id', notes: 'notes',
    })
    await trx.updateTable('routes').set({ ...set, version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    if (input.siteIds !== undefined) await writeStops(trx, ctx.org.id, id, input.siteIds)
  })
  return getRoute(ctx, id)
}

/** Reorders the stops for the shortest trip from the base (the tour planner) and saves the order. */
export async function orderRoute(ctx: MemberContext, id: string, version: number): Promise<RouteDetail> {
  await useDb().transaction().execute(async (trx) => {
    const route = await lockVersion(trx, ctx, id, version)
    const stops = (await stopsOf(trx, ctx.org.id, [id])).get(id) ?? []
    const order = shortestOrder({ lat: route.base_latitude, lon: route.base_longitude }, stops.map((s) => ({ lat: s.latitude, lon: s.longitude })))
    await writeStops(trx, ctx.org.id, id, order.map((k) => stops[k]!.siteId))
    await trx.updateTable('routes').set({ version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
  })
  return getRoute(ctx, id)
}

/** Archives or restores a route (never deleted: surveys will refer to it). */
export async function setRouteArchived(ctx: MemberContext, id: string, version: number, archived: boolean): Promise<RouteDetail> {
  await useDb().transaction().execute(async (trx) => {
    const before = await lockVersion(trx, ctx, id, version)
    const route = await trx.updateTable('routes')
      .set({ archived_at: archived ? sql`coalesce(archived_at, now())` : null, version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).returning('name').executeTakeFirstOrThrow()
    if ((before.archived_at === null) === archived) {
      await record(trx, { ctx, action: archived ? 'route.archived' : 'route.restored', target: { kind: 'route', id, label: route.name } })
    }
  })
  return getRoute(ctx, id)
}
