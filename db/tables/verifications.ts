import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** waiting → passed | failed; withdrawn when the work order left "awaiting verification" first. */
export type VerificationState = 'waiting' | 'passed' | 'failed' | 'withdrawn'

/** A re-scan of a repaired finding's component: the inputs as typed and what the engine computed (null while waiting). */
export interface VerificationsTable {
  id: Generated<string>
  organisation_id: string
  work_order_id: string
  finding_id: string
  site_id: string
  thermographer_id: string | null
  survey_id: string | null
  instrument_id: string | null
  state: Generated<VerificationState>
  warnings: ColumnType<unknown, string | undefined, string>
  notes: Generated<string>
  recorded_by: string | null
  recorded_at: Date | null
  apparent_c: number | null
  reference_c: number | null
  ambient_c: number | null
  emissivity: number | null
  reflected_c: number | null
  reflected_method: 'reflector' | 'direct' | 'estimated' | null
  distance_m: number | null
  transmittance: number | null
  window_transmittance: number | null
  window_c: number | null
  load_a: number | null
  rated_a: number | null
  wind_ms: number | null
  object_c: number | null
  rise_over_reference_k: number | null
  rise_over_ambient_k: number | null
  load_scaled_rise_k: number | null
  band: number | null
  band_basis: string | null
  uncertainty_low_c: number | null
  uncertainty_high_c: number | null
  criteria_id: string | null
  criteria_version: number | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type VerificationRow = Selectable<VerificationsTable>
export type NewVerification = Insertable<VerificationsTable>
export type VerificationUpdate = Updateable<VerificationsTable>
