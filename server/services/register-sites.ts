// Sites of the asset register: list, read, create, edit (optimistic locking), archive and unarchive.
// Every query carries the organisation condition; ids from the client are only looked up together with it.
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { SiteListQuery, SiteUpdateInput, SiteValues } from '#shared/schemas/register'
import type { RegisterPage, SiteItem } from '#shared/types/register'
import { changedMeanwhile, isUniqueViolation, likePattern, pageWindow } from './paging'
import { siteView } from './register-views'
import { assertSiteRoom } from './plan-limits'
import { record } from './audit'

type Db = Kysely<Database> | Transaction<Database>

const activeAssetCount = sql<number>`(select count(*) from assets a where a.organisation_id = s.organisation_id and a.site_id = s.id and a.archived_at is null)`

const SITE_COLUMNS = [
  's.id', 's.code', 's.name', 's.kind', 's.latitude', 's.longitude', 's.voltage_kv', 's.access_notes', 's.safety_notes',
  's.safety_flags', 's.archived_at', 's.version', 's.created_at', 's.updated_at',
] as const

function codeTaken(code: string): never {
  throw createError({
    statusCode: 409,
    statusMessage: 'Code in use',
    data: { message: `Another site already uses the code ${code}.`, fieldErrors: { code: [`Another site (possibly archived) already uses the code ${code}. Choose another.`] } },
  })
}

/** One page of the organisation's sites, filtered, sorted and counted in PostgreSQL. */
export async function listSites(ctx: MemberContext, q: SiteListQuery): Promise<RegisterPage<SiteItem>> {
  const db = useDb()
  let base = db.selectFrom('sites as s').where('s.organisation_id', '=', ctx.org.id)
  if (q.show === 'active') base = base.where('s.archived_at', 'is', null)
  if (q.show === 'archived') base = base.where('s.archived_at', 'is not', null)
  if (q.kind) base = base.where('s.kind', '=', q.kind)
  // Same expression as the trigram index sites_search_trgm_idx, so the index answers it.
  if (q.q) base = base.where(sql`s.code || ' ' || s.name`, 'ilike', likePattern(q.q))

  const dir = q.dir === 'desc' ? sql`desc` : sql`asc`
  const order = {
    name: sql`lower(s.name) ${dir}, s.id ${dir}`,
    code: sql`s.code ${dir}, s.id ${dir}`,
    kind: sql`s.kind ${dir}, lower(s.name) asc, s.id asc`,
    voltage: sql`s.voltage_kv ${dir} nulls last, lower(s.name) asc, s.id asc`,
    assets: sql`${activeAssetCount} ${dir}, lower(s.name) asc, s.id asc`,
    updated: sql`s.updated_at ${dir}, s.id ${dir}`,
  }[q.sort]
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [rows, count] = await Promise.all([
    base.select([...SITE_COLUMNS, activeAssetCount.as('asset_count')]).orderBy(order).limit(limit).offset(offset).execute(),
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
  ])
  return { items: rows.map(siteView), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

async function siteById(db: Db, orgId: string, id: string, lock = false) {
  let query = db.selectFrom('sites as s').select([...SITE_COLUMNS, activeAssetCount.as('asset_count')])
    .where('s.organisation_id', '=', orgId).where('s.id', '=', id)
  if (lock) query = query.forUpdate()
  return query.executeTakeFirst()
}

/** One site of the organisation; 404 when it is not one of theirs. */
export async function getSite(ctx: MemberContext, id: string): Promise<SiteItem> {
  const row = await siteById(useDb(), ctx.org.id, id)
  if (!row) throw notFound('Site')
  return siteView(row)
}

/** Adds a site; the code must be new in the organisation. */
export async function createSite(ctx: MemberContext, input: SiteValues): Promise<SiteItem> {
  try {
    const id = await useDb().transaction().execute(async (trx) => {
      await assertSiteRoom(trx, ctx.org.id, 1)
      const row = await trx.insertInto('sites').values({
        organisation_id: ctx.org.id,
        code: input.code,
        name: input.name,
        kind: input.kind,
        latitude: input.latitude,
        longitude: input.longitude,
        voltage_kv: input.voltageKv,
        access_notes: input.accessNotes,
        safety_notes: input.safetyNotes,
        safety_flags: input.safetyFlags,
        archived_at: null,
      }).returning('id').executeTakeFirstOrThrow()
      return row.id
    })
    return getSite(ctx, id)
  } catch (err) {
    if (isUniqueViolation(err, 'sites_org_code_key')) codeTaken(input.code)
    throw err
  }
}

/** Changes a site; refused with 409 when someone saved a newer version meanwhile. */
export async function updateSite(ctx: MemberContext, id: string, input: SiteUpdateInput & { version: number }): Promise<SiteItem> {
  try {
    const row = await useDb().updateTable('sites')
      .set({
        ...changedColumns(input, {
          code: 'code', name: 'name', kind: 'kind', latitude: 'latitude', longitude: 'longitude',
          voltageKv: 'voltage_kv', accessNotes: 'access_notes', safetyNotes: 'safety_notes',
          safetyFlags: 'safety_flags',
        }),
        version: sql`version + 1`,
        updated_at: new Date(),
      })
      .where('organisation_id', '=', ctx.org.id)
      .where('id', '=', id)
      .where('version', '=', input.version)
      .returning('id')
      .executeTakeFirst()
    if (!row) {
      const exists = await useDb().selectFrom('sites').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
      throw exists ? changedMeanwhile('site') : notFound('Site')
    }
    return getSite(ctx, id)
  } catch (err) {
    if (input.code && isUniqueViolation(err, 'sites_org_code_key')) codeTaken(input.code)
    throw err
  }
}

/**
 * Archives or restores a site. Archiving also archives its active assets with the same timestamp, so that
 * restoring the site brings back exactly those (assets archived on their own before stay archived).
 */
export async function setSiteArchived(ctx: MemberContext, id: string, version: number, archived: boolean): Promise<SiteItem> {
  await useDb().transaction().execute(async (trx) => {
    const site = await siteById(trx, ctx.org.id, id, true)
    if (!site) throw notFound('Site')
    if (site.version !== version) throw changedMeanwhile('site')
    if ((site.archived_at !== null) === archived) return
    const now = new Date()
    let assets: bigint | number
    if (archived) {
      const r = await trx.updateTable('assets').set({ archived_at: now, updated_at: now, version: sql`version + 1` })
        .where('organisation_id', '=', ctx.org.id).where('site_id', '=', id).where('archived_at', 'is', null).executeTakeFirst()
      assets = r.numUpdatedRows
    } else {
      await assertSiteRoom(trx, ctx.org.id, 1)
      const r = await trx.updateTable('assets').set({ archived_at: null, updated_at: now, version: sql`version + 1` })
        .where('organisation_id', '=', ctx.org.id).where('site_id', '=', id)
        // Compared in SQL: the stored timestamp has microseconds a JavaScript Date would round away.
        .where('archived_at', '=', (eb) => eb.selectFrom('sites').select('archived_at').where('organisation_id', '=', ctx.org.id).where('id', '=', id))
        .executeTakeFirst()
      assets = r.numUpdatedRows
    }
    await trx.updateTable('sites').set({ archived_at: archived ? now : null, updated_at: now, version: sql`version + 1` })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    await record(trx, {
      ctx, action: archived ? 'site.archived' : 'site.restored', target: { kind: 'site', id, label: `${site.code} · ${site.name}` },
      details: { assets: Number(assets) },
    })
  })
  return getSite(ctx, id)
}
