import { randomUUID } from 'node:crypto'
import type { Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { TemperatureGridRow } from '~~/db/tables/temperature-grids'
import { gridToBytes, parseGridCsv, type GridRegion } from '#shared/thermal/grid'
import type { gridRegionsSchema, gridUploadSchema } from '#shared/schemas/grid'
import type { TemperatureGridMeta } from '#shared/types/grid'

type Db = ReturnType<typeof useDb> | Transaction<Database>

// Grids are part of the survey's record, so the rules of recording apply: only the assigned thermographer, only while
// the survey is in progress or returned (the same rules as checks and findings in surveys.ts).
async function lockRecordableSurvey(trx: Db, ctx: MemberContext, surveyId: string) {
  const s = await trx.selectFrom('surveys').select(['id', 'state', 'thermographer_id'])
    .where('organisation_id', '=', ctx.org.id).where('id', '=', surveyId).where('archived_at', 'is', null)
    .forUpdate().executeTakeFirst()
  if (!s) throw notFound('Survey')
  if (s.thermographer_id !== ctx.user.id) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Not your survey',
      data: { message: 'Only the thermographer assigned to this survey can attach or mark temperature grids on it.' },
    })
  }
  if (s.state !== 'in_progress' && s.state !== 'returned') {
    const why = s.state === 'planned' ? 'Start the survey first.' : 'It has been submitted; a manager can return it to you.'
    throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message: `Grids can only be attached while the survey is in progress or returned. ${why}` } })
  }
  return s
}

function gridQuery(db: Db, orgId: string) {
  return db.selectFrom('temperature_grids as g')
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'g.organisation_id').onRef('s.id', '=', 'g.survey_id'))
    .innerJoin('instruments as i', (j) => j.onRef('i.organisation_id', '=', 's.organisation_id').onRef('i.id', '=', 's.instrument_id'))
    .selectAll('g').select(['i.band_from_um', 'i.band_to_um'])
    .where('g.organisation_id', '=', orgId)
    .where('g.archived_at', 'is', null)
    .where('s.archived_at', 'is', null)
}

function toMeta(g: TemperatureGridRow & { band_from_um: unknown; band_to_um: unknown }): TemperatureGridMeta {
  return {
    id: g.id,
    surveyId: g.survey_id,
    assetId: g.asset_id,
    findingId: g.finding_id,
    width: g.width,
    height: g.height,
    sourceUnit: g.source_unit,
    fileName: g.file_name,
    minC: g.min_c,
    maxC: g.max_c,
    hotRegion: g.hot_region,
    referenceRegion: g.reference_region,
    band: { fromUm: Number(g.band_from_um), toUm: Number(g.band_to_um) },
    createdAt: g.created_at.toISOString(),
  }
}

/** A grid of this organisation (404 otherwise). */
export async function getGrid(ctx: MemberContext, id: string, db: Db = useDb()): Promise<TemperatureGridMeta> {
  const row = await gridQuery(db, ctx.org.id).where('g.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Temperature grid')
  return toMeta(row)
}

/** The stored values: little-endian Float32 °C, row-major, width × height of them. */
export async function getGridValues(ctx: MemberContext, id: string): Promise<{ meta: TemperatureGridMeta; bytes: Uint8Array }> {
  const row = await gridQuery(useDb(), ctx.org.id).where('g.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Temperature grid')
  // The key was written by the server under this organisation's prefix; it is never taken from a client.
  const bytes = await getObjectBytes(row.object_key)
  if (!bytes || bytes.byteLength !== row.width * row.height * 4) {
    throw createError({ statusCode: 502, statusMessage: 'Grid unavailable', data: { message: 'The stored grid could not be read. Try again, or attach the file again.' } })
  }
  return { meta: toMeta(row), bytes }
}

/**
 * Parses and checks an uploaded CSV grid with the shared reader (the same limits as the browser), stores its values
 * in object storage under the organisation's prefix and records it for the asset on the survey.
 */
export async function uploadGrid(ctx: MemberContext, surveyId: string, input: z.output<typeof gridUploadSchema>): Promise<TemperatureGridMeta> {
  const id = await useDb().transaction().execute(async (trx) => {
    await lockRecordableSurvey(trx, ctx, surveyId)
    const asset = await trx.selectFrom('assets as a')
      .innerJoin('survey_sites as ss', (j) => j.onRef('ss.organisation_id', '=', 'a.organisation_id').onRef('ss.site_id', '=', 'a.site_id'))
      .select('a.id')
      .where('a.organisation_id', '=', ctx.org.id).where('a.id', '=', input.assetId).where('ss.survey_id', '=', surveyId).where('a.archived_at', 'is', null)
      .executeTakeFirst()
    if (!asset) fieldError('assetId', 'This asset is not at one of the survey’s sites.')
    const parsed = parseGridCsv(input.csv, input.unit)
    if (!parsed.ok) {
      const { row, column, message } = parsed.problem
      throw createError({ statusCode: 400, statusMessage: 'Invalid grid', data: { message, fieldErrors: { csv: [message] }, problem: { row, column } } })
    }
    const g = parsed.grid
    const gridId = randomUUID()
    const key = tenantKey(ctx.org.id, 'grids', `${gridId}.f32`)
    await trx.insertInto('temperature_grids').values({
      id: gridId, organisation_id: ctx.org.id, survey_id: surveyId, asset_id: input.assetId, finding_id: null,
      width: g.width, height: g.height, source_unit: input.unit, file_name: input.fileName.replace(/[\r\n\t]/g, ' ').slice(0, 200),
      min_c: g.minC, max_c: g.maxC, object_key: key, hot_region: null, reference_region: null, created_by: ctx.user.id, archived_at: null,
    }).execute()
    // Written inside the transaction: if storage fails, no row points at a missing object.
    await putObject(key, gridToBytes(g.valuesC), 'application/octet-stream')
    return gridId
  })
  return getGrid(ctx, id)
}

function checkInside(region: GridRegion | null, field: string, width: number, height: number) {
  if (region && (region.x + region.w > width || region.y + region.h > height)) {
    fieldError(field, `The region reaches past the grid (${width} × ${height} pixels).`)
  }
}

/** Saves the hot-spot and reference regions marked on a grid (assigned thermographer, survey being recorded). */
export async function saveGridRegions(ctx: MemberContext, id: string, input: z.output<typeof gridRegionsSchema>): Promise<TemperatureGridMeta> {
  await useDb().transaction().execute(async (trx) => {
    const g = await trx.selectFrom('temperature_grids').select(['id', 'survey_id', 'width', 'height'])
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('archived_at', 'is', null).executeTakeFirst()
    if (!g) throw notFound('Temperature grid')
    await lockRecordableSurvey(trx, ctx, g.survey_id)
    checkInside(input.hot, 'hot', g.width, g.height)
    checkInside(input.reference, 'reference', g.width, g.height)
    await trx.updateTable('temperature_grids').set({
      hot_region: input.hot ? JSON.stringify(input.hot) : null,
      reference_region: input.reference ? JSON.stringify(input.reference) : null,
      updated_at: new Date(),
    }).where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
  })
  return getGrid(ctx, id)
}

/**
 * Links a grid to the finding it backs, inside the finding's transaction: the grid must be this organisation's,
 * uploaded for the same survey and asset, and not yet backing another finding.
 */
export async function linkGridToFinding(trx: Db, ctx: MemberContext, p: { gridId: string; surveyId: string; assetId: string; findingId: string }): Promise<void> {
  const res = await trx.updateTable('temperature_grids').set({ finding_id: p.findingId, updated_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', p.gridId).where('survey_id', '=', p.surveyId)
    .where('asset_id', '=', p.assetId).where('archived_at', 'is', null).where('finding_id', 'is', null)
    .executeTakeFirst()
  if (Number(res.numUpdatedRows) === 0) {
    fieldError('gridId', 'This temperature grid was not attached to this asset on this survey, or it already backs another finding.')
  }
}
