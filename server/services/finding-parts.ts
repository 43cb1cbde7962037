import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { FindingRow } from '~~/db/tables/findings'
import { correctionChain, isThermalInputError } from '#shared/thermal/index'
import { FINDING_ENGINE_FIELDS, findingChainInput, type FindingValues, type findingSchema } from '#shared/schemas/survey'
import type { FindingExtras } from '#shared/types/finding'
import { num } from './paging'
import { computedColumns, readingColumns } from './finding-columns'
import type { FINDING_API_COLUMNS } from './finding-list-sql'

export { computedColumns, readingColumns }

// Pieces of a finding shared by recording (surveys.ts) and editing/reviewing (findings.ts); imports neither.

type Db = ReturnType<typeof useDb> | Transaction<Database>

/** The part of a finding's row an API finding is made of (FINDING_API_COLUMNS in finding-list-sql.ts), with its reviewer's name. */
export type FindingApiRow = Pick<FindingRow, typeof FINDING_API_COLUMNS[number]> & { reviewer_name?: string | null }

/** The reviewer's name for a findings row aliased `f` (users are global; the id comes from the tenant's own row). */
export function reviewerNameSql() {
  return sql<string | null>`(select u.name from users u where u.id = f.reviewed_by)`
}

/** The band lists and the schedule use: the manager's reviewed band when there is one, else the computed band. */
export function effectiveBandSql(alias = 'f') {
  return sql<number | null>`coalesce(${sql.ref(`${alias}.reviewed_band`)}, ${sql.ref(`${alias}.band`)})`
}

/** Review, closing and surface fields of the API finding. */
export function findingExtras(f: FindingApiRow): FindingExtras {
  return {
    effectiveBand: f.reviewed_band ?? f.band,
    review: f.reviewed_band !== null && f.reviewed_band !== undefined
      ? {
          band: f.reviewed_band,
          reason: f.review_reason ?? '',
          by: f.reviewed_by ? { id: f.reviewed_by, name: f.reviewer_name ?? '' } : null,
          at: (f.reviewed_at ?? new Date(0)).toISOString(),
        }
      : null,
    closedAt: f.closed_at ? f.closed_at.toISOString() : null,
    surfaceId: f.surface_id ?? null,
  }
}

/** A surface picked for ε must be one of the organisation's (archived ones are kept for old findings only). */
export async function assertSurface(trx: Db, ctx: MemberContext, surfaceId: string | null | undefined, allowArchivedId?: string | null) {
  if (!surfaceId) return
  const row = await trx.selectFrom('surfaces').select(['id', 'archived_at'])
    .where('organisation_id', '=', ctx.org.id).where('id', '=', surfaceId).executeTakeFirst()
  if (!row || (row.archived_at && row.id !== allowArchivedId)) fieldError('surfaceId', 'Choose a surface from this organisation’s library that is not archived.')
}


/** The imager fields the engine needs, as read from an `instruments` row. */
export interface EngineInstrumentRow {
  band_from_um: string | number
  band_to_um: string | number
  accuracy_k: string | number | null
  accuracy_pct: string | number | null
  ifov_mrad: string | number | null
  calibration_due: string | null
}

/** Selects an instrument of the organisation with the columns the engine needs (tenant condition inside). */
export function engineInstrumentQuery(trx: Db, orgId: string, instrumentId: string) {
  return trx.selectFrom('instruments').select(['band_from_um', 'band_to_um', 'accuracy_k', 'accuracy_pct', 'ifov_mrad', 'archived_at'])
    .select(sql<string | null>`to_char(calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .where('organisation_id', '=', orgId).where('id', '=', instrumentId)
}

/**
 * Runs the correction chain on the server for a reading (findings and verification re-scans alike); client figures
 * are never trusted. A reading the engine cannot explain is a 400 at the field it came from.
 */
export function serverChain(inst: EngineInstrumentRow, input: FindingValues, opts: { criteriaId: string; today: string }) {
  const { reading, options } = findingChainInput(input, {
    bandFromUm: Number(inst.band_from_um), bandToUm: Number(inst.band_to_um), accuracyK: num(inst.accuracy_k),
    accuracyPct: num(inst.accuracy_pct), ifovMrad: num(inst.ifov_mrad), calibrationDue: inst.calibration_due,
  }, opts)
  try {
    return correctionChain(reading, options)
  } catch (e) {
    if (isThermalInputError(e)) fieldError(FINDING_ENGINE_FIELDS[e.field ?? ''] ?? 'apparentC', e.message)
    throw e
  }
}

/**
 * Runs the engine on the server for a finding's inputs with the survey's instrument and date, and returns the
 * columns to store (inputs and computed values). A reading the engine cannot explain is a 400 at its field.
 */
export async function findingColumns(
  trx: Db,
  ctx: MemberContext,
  survey: { instrument_id: string; day: string },
  input: z.output<typeof findingSchema>,
  criteriaId: string,
) {
  const inst = await engineInstrumentQuery(trx, ctx.org.id, survey.instrument_id).executeTakeFirstOrThrow()
  const chain = serverChain(inst, input, { criteriaId, today: survey.day })
  return {
    component: input.component, phase: input.phase ?? '',
    ...readingColumns(input),
    probable_cause: input.probableCause, cause_notes: input.causeNotes ?? '', notes: input.notes ?? '',
    surface_id: input.surfaceId ?? null,
    ...computedColumns(chain),
    action: chain.rank.action,
    repair_deadline_days: chain.rank.repairDeadlineDays,
  }
}
