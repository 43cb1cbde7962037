// Assets of the asset register: the large server-side list (search, filters, sort, pages), read, create, edit
// with optimistic locking, archive and unarchive. Every query carries the organisation condition.
import { sql, type Kysely, type RawBuilder, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { AssetListQuery, AssetUpdateInput, AssetValues } from '#shared/schemas/register'
import type { AssetItem, RegisterPage } from '#shared/types/register'
import { addDays, todayIn } from '#shared/schedule'
import { changedMeanwhile, isUniqueViolation, likePattern, pageWindow } from './paging'
import { assetDueSql } from './schedule-sql'
import { assetView } from './register-views'
import { record } from './audit'

type Db = Kysely<Database> | Transaction<Database>

/** Up to this many sites matching a search are passed to the asset query as a list of ids. */
const SITE_MATCH_LIMIT = 500

async function organisationToday(db: Db, orgId: string): Promise<string> {
  const org = await db.selectFrom('organisations').select('time_zone').where('id', '=', orgId).executeTakeFirstOrThrow()
  return todayIn(org.time_zone)
}

/** One page of the organisation's assets; filtering, sorting, counting and paging all happen in PostgreSQL. */
export async function listAssets(ctx: MemberContext, q: AssetListQuery): Promise<RegisterPage<AssetItem>> {
  const db = useDb()
  const orgId = ctx.org.id
  const today = await organisationToday(db, orgId)
  // Sites whose code or name matches the search: a short list is passed as values, a long one stays a subquery.
  const pattern = q.q ? likePattern(q.q) : ''
  const siteMatches = q.q
    ? (await db.selectFrom('sites').select('id').where('organisation_id', '=', orgId)
        .where(sql`code || ' ' || name`, 'ilike', pattern).limit(SITE_MATCH_LIMIT + 1).execute()).map((r) => r.id)
    : []

  // One WHERE for the count and the page, as SQL over the alias `a` (and `o` for the schedule).
  const conds: RawBuilder<unknown>[] = [sql`a.organisation_id = ${orgId}`]
  if (q.show === 'active') conds.push(sql`a.archived_at is null`)
  if (q.show === 'archived') conds.push(sql`a.archived_at is not null`)
  if (q.site) conds.push(sql`a.site_id = ${q.site}`)
  if (q.class) conds.push(sql`a.asset_class = ${q.class}`)
  if (q.criticality?.length) conds.push(sql`a.criticality in (${sql.join(q.criticality)})`)
  if (q.condition?.length) conds.push(sql`a.condition in (${sql.join(q.condition)})`)
  const orgJoin = q.due ? sql`join organisations o on o.id = a.organisation_id` : sql``
  if (q.due) {
    const dueOn = assetDueSql(today).dueOn
    conds.push(q.due === 'overdue'
      ? sql`${dueOn} < ${today}::date`
      : sql`${dueOn} between ${today}::date and ${addDays(today, Number(q.due.slice('within-'.length)))}::date`)
  }
  const where = sql.join(conds, sql` and `)

  const dir = q.dir === 'desc' ? sql`desc` : sql`asc`
  // Ties are broken by label then id, so pages never overlap or skip a row.
  const order = {
    label: sql`lower(a.label) ${dir}, a.id ${dir}`,
    site: sql`lower(s.name) ${dir}, s.id ${dir}, lower(a.label) asc, a.id asc`,
    class: sql`a.asset_class ${dir}, lower(a.label) asc, a.id asc`,
    criticality: sql`a.criticality ${dir}, lower(a.label) asc, a.id asc`,
    condition: sql`a.condition ${dir}, lower(a.label) asc, a.id asc`,
    updated: sql`a.updated_at ${dir}, a.id ${dir}`,
  }[q.sort]
  // Active assets only sit at active sites (archiving a site archives its assets), so saying so lets the planner
  // walk sites in name order through their partial index.
  const siteJoin = q.sort === 'site'
    ? sql`join sites s on s.organisation_id = a.organisation_id and s.id = a.site_id ${q.show === 'active' ? sql`and s.archived_at is null` : sql``}`
    : sql``
  const { limit, offset } = pageWindow(q.page, q.pageSize)

  let pageQuery
  let countQuery
  if (q.q) {
    // A search first collects its matches — through the trigram index on the asset's text (same expression as
    // assets_search_trgm_idx) and, as a second branch, through the matching sites — then sorts only those. In one
    // WHERE with OR, or left to walk the label index, the planner would read every asset of the organisation.
    const columns = sql`a.id, a.organisation_id, a.site_id, a.label, a.asset_class, a.criticality, a.condition, a.updated_at`
    const byText = sql`select ${columns} from assets a ${orgJoin}
      where ${where} and (a.label || ' ' || a.manufacturer || ' ' || a.model) ilike ${pattern}`
    const bySite = siteMatches.length > SITE_MATCH_LIMIT
      ? sql`a.site_id in (select id from sites where organisation_id = ${orgId} and code || ' ' || name ilike ${pattern})`
      : sql`a.site_id in (${sql.join(siteMatches)})`
    const matches = siteMatches.length ? sql`${byText} union select ${columns} from assets a ${orgJoin} where ${where} and ${bySite}` : byText
    pageQuery = sql<{ id: string }>`with m as materialized (${matches})
      select a.id from m a ${siteJoin} order by ${order} limit ${limit} offset ${offset}`
    countQuery = sql<{ n: number }>`select count(*)::int as n from (${matches}) m`
  } else {
    pageQuery = sql<{ id: string }>`select a.id from assets a ${orgJoin} ${siteJoin} where ${where} order by ${order} limit ${limit} offset ${offset}`
    countQuery = sql<{ n: number }>`select count(*)::int as n from assets a ${orgJoin} where ${where}`
  }
  const [ids, count] = await Promise.all([pageQuery.execute(db), countQuery.execute(db)])
  const rows = ids.rows.length ? await assetRows(db, orgId, ids.rows.map((r) => r.id), today) : []
  const byId = new Map(rows.map((r) => [r.id, r]))
  return {
    items: ids.rows.map((r) => byId.get(r.id)).filter((r) => r !== undefined).map(assetView),
    total: count.rows[0]?.n ?? 0,
    page: q.page,
    pageSize: q.pageSize,
  }
}

function assetRows(db: Db, orgId: string, ids: string[], today: string) {
  return db.selectFrom('assets as a')
    .innerJoin('sites as s', (j) => j.onRef('s.organisation_id', '=', 'a.organisation_id').onRef('s.id', '=', 'a.site_id'))
    .innerJoin('organisations as o', 'o.id', 'a.organisation_id')
    .select([
      'a.id', 'a.site_id', 's.code as site_code', 's.name as site_name', 's.archived_at as site_archived_at', 'a.label',
      'a.asset_class', 'a.manufacturer', 'a.model', 'a.voltage_kv', 'a.rated_current_a', 'a.criticality', 'a.condition',
      'a.components', 'a.interval_months', 'a.archived_at', 'a.version', 'a.created_at', 'a.updated_at',
      sql<string>`(${assetDueSql(today).dueOn})::text`.as('due_on'),
    ])
    .where('a.organisation_id', '=', orgId)
    .where('a.id', 'in', ids)
    .execute()
}

/** One asset of the organisation; 404 when it is not one of theirs. */
export async function getAsset(ctx: MemberContext, id: string): Promise<AssetItem> {
  const db = useDb()
  const [row] = await assetRows(db, ctx.org.id, [id], await organisationToday(db, ctx.org.id))
  if (!row) throw notFound('Asset')
  return assetView(row)
}

// The site must be one of the organisation's and in use: assets are not added to archived sites.
async function usableSite(db: Db, orgId: string, siteId: string) {
  const site = await db.selectFrom('sites').select(['id', 'code', 'archived_at']).where('organisation_id', '=', orgId).where('id', '=', siteId).executeTakeFirst()
  if (!site) fieldError('siteId', 'Choose a site of this organisation.')
  if (site.archived_at) fieldError('siteId', `The site ${site.code} is archived. Restore it first, or choose another site.`)
  return site
}

function labelTaken(label: string): never {
  throw createError({
    statusCode: 409,
    statusMessage: 'Label in use',
    data: { message: `This site already has an asset labelled ${label}.`, fieldErrors: { label: [`This site already has an asset labelled ${label} (possibly archived). Choose another label.`] } },
  })
}

/** Adds an asset to a site of the organisation. */
export async function createAsset(ctx: MemberContext, input: AssetValues): Promise<AssetItem> {
  const db = useDb()
  await usableSite(db, ctx.org.id, input.siteId)
  try {
    const { id } = await db.insertInto('assets').values({
      organisation_id: ctx.org.id,
      site_id: input.siteId,
      label: input.label,
      asset_class: input.assetClass,
      manufacturer: input.manufacturer,
      model: input.model,
      voltage_kv: input.voltageKv,
      rated_current_a: input.ratedCurrentA,
      criticality: input.criticality,
      condition: input.condition,
      components: input.components,
      interval_months: input.intervalMonths,
      archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    return getAsset(ctx, id)
  } catch (err) {
    if (isUniqueViolation(err, 'assets_site_label_key')) labelTaken(input.label)
    throw err
  }
}

/** Changes an asset; refused with 409 when someone saved a newer version meanwhile. */
export async function updateAsset(ctx: MemberContext, id: string, input: AssetUpdateInput & { version: number }): Promise<AssetItem> {
  const db = useDb()
  if (input.siteId !== undefined) await usableSite(db, ctx.org.id, input.siteId)
  try {
    const row = await db.updateTable('assets')
      .set({
        ...changedColumns(input, {
          siteId: 'site_id', label: 'label', assetClass: 'asset_class', manufacturer: 'manufacturer',
          model: 'model', voltageKv: 'voltage_kv', ratedCurrentA: 'rated_current_a',
          criticality: 'criticality', condition: 'condition', components: 'components',
          intervalMonths: 'interval_months',
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
      const exists = await db.selectFrom('assets').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
      throw exists ? changedMeanwhile('asset') : notFound('Asset')
    }
    return getAsset(ctx, id)
  } catch (err) {
    if (isUniqueViolation(err, 'assets_site_label_key')) labelTaken(input.label ?? 'that')
    throw err
  }
}

/** Archives or restores an asset (history stays: nothing is deleted). */
export async function setAssetArchived(ctx: MemberContext, id: string, version: number, archived: boolean): Promise<AssetItem> {
  await useDb().transaction().execute(async (trx) => {
    const asset = await trx.selectFrom('assets as a')
      .innerJoin('sites as s', (j) => j.onRef('s.organisation_id', '=', 'a.organisation_id').onRef('s.id', '=', 'a.site_id'))
      .select(['a.version', 'a.archived_at', 'a.label', 's.code', 's.archived_at as site_archived_at'])
      .where('a.organisation_id', '=', ctx.org.id).where('a.id', '=', id)
      .forUpdate('a')
      .executeTakeFirst()
    if (!asset) throw notFound('Asset')
    if (asset.version !== version) throw changedMeanwhile('asset')
    if ((asset.archived_at !== null) === archived) return
    if (!archived && asset.site_archived_at) {
      throw createError({ statusCode: 409, statusMessage: 'Site archived', data: { message: `Its site ${asset.code} is archived. Restore the site first.` } })
    }
    await trx.updateTable('assets')
      .set({ archived_at: archived ? new Date() : null, updated_at: new Date(), version: sql`version + 1` })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id)
      .execute()
    await record(trx, { ctx, action: archived ? 'asset.archived' : 'asset.restored', target: { kind: 'asset', id, label: `${asset.code} · ${asset.label}` } })
  })
  return getAsset(ctx, id)
}
