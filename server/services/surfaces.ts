import { sql } from 'kysely'
import type { z } from 'zod'
import type { SurfaceRow } from '~~/db/tables/surfaces'
import { SURFACE_METHOD_LABELS, type surfaceCreateSchema, type surfaceListQuerySchema, type surfaceUpdateSchema } from '#shared/schemas/surface'
import type { Page, SurfaceItem } from '#shared/types/programme'
import { changedMeanwhile, likePattern, num, pageWindow } from './paging'
import { record } from './audit'

type Row = Omit<SurfaceRow, 'measured_on' | 'created_by' | 'organisation_id' | 'created_at' | 'updated_at' | 'archived_at'> & {
  measured_on: string | null
  created_by_name: string | null
}

function toItem(r: Row): SurfaceItem {
  const low = num(r.range_low)
  const high = num(r.range_high)
  return {
    id: r.id, seedKey: r.seed_key, name: r.name, emissivity: Number(r.emissivity), range: low !== null && high !== null ? [low, high] : null,
    source: r.source, provenance: r.provenance, method: r.method, measuredOn: r.measured_on, notes: r.notes,
    createdBy: r.created_by_name, version: r.version,
  }
}

function base(orgId: string) {
  return useDb().selectFrom('surfaces as s')
    .leftJoin('users as u', 'u.id', 's.created_by')
    .select(['s.id', 's.seed_key', 's.name', 's.emissivity', 's.range_low', 's.range_high', 's.source', 's.provenance', 's.method', 's.notes', 's.version', 'u.name as created_by_name'])
    .select(sql<string | null>`to_char(s.measured_on, 'YYYY-MM-DD')`.as('measured_on'))
    .where('s.organisation_id', '=', orgId)
    .where('s.archived_at', 'is', null)
}

/** The organisation's surface library, filtered, sorted and paginated. */
export async function listSurfaces(ctx: MemberContext, q: z.output<typeof surfaceListQuerySchema>): Promise<Page<SurfaceItem>> {
  let query = base(ctx.org.id)
  if (q.kind === 'reference') query = query.where('s.provenance', '!=', 'measured')
  if (q.kind === 'measured') query = query.where('s.provenance', '=', 'measured')
  if (q.q) {
    const like = likePattern(q.q)
    query = query.where((eb) => eb.or([eb('s.name', 'ilike', like), eb('s.source', 'ilike', like), eb('s.notes', 'ilike', like)]))
  }
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    query.clearSelect().select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    query.$if(q.sort === 'emissivity', (b) => b.orderBy('s.emissivity', 'desc'))
      .orderBy('s.name').orderBy('s.id').limit(limit).offset(offset).execute(),
  ])
  return { items: rows.map(toItem), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

/** One active surface of the organisation. */
export async function getSurface(ctx: MemberContext, id: string): Promise<SurfaceItem> {
  const row = await base(ctx.org.id).where('s.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Surface')
  return toItem(row)
}

function measuredSource(name: string, method: keyof typeof SURFACE_METHOD_LABELS): string {
  return `Measured by ${name} per ASTM E1933 (${SURFACE_METHOD_LABELS[method].toLowerCase()})`
}

/** Adds a value measured by the organisation, with the ASTM E1933 method used. */
export async function createSurface(ctx: MemberContext, input: z.output<typeof surfaceCreateSchema>): Promise<SurfaceItem> {
  const row = await useDb().insertInto('surfaces').values({
    organisation_id: ctx.org.id, seed_key: null, name: input.name, emissivity: input.emissivity, range_low: null, range_high: null,
    source: measuredSource(ctx.user.name, input.method), provenance: 'measured', method: input.method,
    measured_on: input.measuredOn ?? null, notes: input.notes ?? '', created_by: ctx.user.id, archived_at: null,
  }).returning('id').executeTakeFirstOrThrow()
  return getSurface(ctx, row.id)
}

// Reference values stay as published: a different value is a measurement of one's own, added beside them.
async function measuredOnly(ctx: MemberContext, id: string): Promise<SurfaceItem> {
  const current = await getSurface(ctx, id)
  if (current.provenance !== 'measured') {
    throw createError({
      statusCode: 409,
      statusMessage: 'Reference value',
      data: { message: 'Reference values are kept as their source gives them. Add your own measured value instead.' },
    })
  }
  return current
}

/** Changes a measured value (optimistic locking on `version`). */
export async function updateSurface(ctx: MemberContext, id: string, input: z.output<typeof surfaceUpdateSchema>): Promise<SurfaceItem> {
  const current = await measuredOnly(ctx, id)
  const set = changedColumns(input, { name: 'name', emissivity: 'emissivity', method: 'method', measuredOn: 'measured_on', notes: 'notes' })
  // The source text names the method, so it follows a change of method.
  if (input.method !== undefined) set.source = measuredSource(current.createdBy ?? ctx.user.name, input.method)
  const row = await useDb().updateTable('surfaces')
    .set({ ...set, version: sql`version + 1`, updated_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('version', '=', input.version).where('archived_at', 'is', null)
    .returning('id').executeTakeFirst()
  if (!row) throw changedMeanwhile('surface')
  return getSurface(ctx, id)
}

/** Archives a measured value: it leaves the library, records that used it keep their number. */
export async function archiveSurface(ctx: MemberContext, id: string, version: number): Promise<{ id: string; archived: true }> {
  await measuredOnly(ctx, id)
  const row = await useDb().transaction().execute(async (trx) => {
    const archived = await trx.updateTable('surfaces')
      .set({ archived_at: new Date(), version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('version', '=', version).where('archived_at', 'is', null)
      .returning(['id', 'name', 'emissivity']).executeTakeFirst()
    if (archived) {
      await record(trx, { ctx, action: 'surface.archived', target: { kind: 'surface', id, label: archived.name }, details: { emissivity: Number(archived.emissivity) } })
    }
    return archived
  })
  if (!row) throw changedMeanwhile('surface')
  return { id, archived: true }
}
