import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { FindingRow } from '~~/db/tables/findings'
import { ZERO_CELSIUS_K, correctionChain, isThermalInputError } from '#shared/thermal/index'
import { FINDING_ENGINE_FIELDS, findingChainInput, type findingSchema } from '#shared/schemas/survey'
import type { FindingExtras } from '#shared/types/finding'
import { num } from './paging'

// Pieces of a finding shared by recording (surveys.ts) and editing/reviewing (findings.ts); imports neither.

type Db = ReturnType<typeof useDb> | Transaction<Database>

/** A finding row as read with its reviewer's name (see reviewerNameSql). */
export type FindingRowWithReviewer = FindingRow & { reviewer_name?: string | null }

/** The reviewer's name for a findings row aliased `f` (users are global; the id comes from the tenant's own row). */
export function reviewerNameSql() {
  return sql<string | null>`(select u.name from users u where u.id = f.reviewed_by)`
}

/** The band lists and the schedule use: the manager's reviewed band when there is one, else the computed band. */
export function effectiveBandSql(alias = 'f') {
  return sql<number | null>`coalesce(${sql.ref(`${alias}.reviewed_band`)}, ${sql.ref(`${alias}.band`)})`
}

/** Review, closing and surface fields of the API finding. */
export function findingExtras(f: FindingRowWithReviewer): FindingExtras {
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

const kToC = (k: number) => k - ZERO_CELSIUS_K

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
  const inst = await trx.selectFrom('instruments').select(['band_from_um', 'band_to_um', 'accuracy_k', 'accuracy_pct', 'ifov_mrad'])
    .select(sql<string | null>`to_char(calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .where('organisation_id', '=', ctx.org.id).where('id', '=', survey.instrument_id).executeTakeFirstOrThrow()
  const { reading, options } = findingChainInput(input, {
    bandFromUm: Number(inst.band_from_um), bandToUm: Number(inst.band_to_um), accuracyK: num(inst.accuracy_k),
    accuracyPct: num(inst.accuracy_pct), ifovMrad: num(inst.ifov_mrad), calibrationDue: inst.calibration_due,
  }, { criteriaId, today: survey.day })
  let chain: ReturnType<typeof correctionChain>
  try {
    chain = correctionChain(reading, options)
  } catch (e) {
    if (isThermalInputError(e)) fieldError(FINDING_ENGINE_FIELDS[e.field ?? ''] ?? 'apparentC', e.message)
    throw e
  }
  const scaled = chain.loadFactor !== null ? (chain.ranked.overReferenceK ?? chain.ranked.overAmbientK ?? null) : null
  return {
    component: input.component, phase: input.phase ?? '',
    apparent_c: input.apparentC!, reference_c: input.referenceC ?? null, ambient_c: input.ambientC ?? null, emissivity: input.emissivity!,
    reflected_c: input.reflectedC!, reflected_method: input.reflectedMethod, distance_m: input.distanceM ?? null,
    transmittance: input.transmittance ?? null, window_transmittance: input.windowTransmittance ?? null, window_c: input.windowC ?? null,
    load_a: input.loadA ?? null, rated_a: input.ratedA ?? null, wind_ms: input.windMs ?? null,
    probable_cause: input.probableCause, cause_notes: input.causeNotes ?? '', notes: input.notes ?? '',
    surface_id: input.surfaceId ?? null,
    object_c: kToC(chain.hotObjectK),
    rise_over_reference_k: chain.measured.overReferenceK ?? null,
    rise_over_ambient_k: chain.measured.overAmbientK ?? null,
    load_scaled_rise_k: scaled,
    band: chain.rank.band,
    band_basis: chain.rank.basis,
    action: chain.rank.action,
    repair_deadline_days: chain.rank.repairDeadlineDays,
    uncertainty_low_c: chain.hotInterval ? kToC(chain.hotInterval.low) : null,
    uncertainty_high_c: chain.hotInterval ? kToC(chain.hotInterval.high) : null,
    warnings: JSON.stringify(chain.warnings),
    criteria_id: chain.rank.criteriaId,
    criteria_version: chain.rank.criteriaVersion,
  }
}
