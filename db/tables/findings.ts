import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** A finding: the reading's inputs (°C, m) and what the engine computed from them on the server. */
export interface FindingsTable {
  id: Generated<string>
  organisation_id: string
  check_id: string
  component: string
  phase: Generated<string>
  apparent_c: number
  reference_c: number | null
  ambient_c: number | null
  emissivity: number
  reflected_c: number
  reflected_method: 'reflector' | 'direct' | 'estimated'
  distance_m: number | null
  transmittance: number | null
  window_transmittance: number | null
  window_c: number | null
  load_a: number | null
  rated_a: number | null
  wind_ms: number | null
  probable_cause: string
  cause_notes: Generated<string>
  notes: Generated<string>
  object_c: number
  rise_over_reference_k: number | null
  rise_over_ambient_k: number | null
  load_scaled_rise_k: number | null
  band: number | null
  band_basis: string | null
  action: Generated<string>
  repair_deadline_days: number | null
  uncertainty_low_c: number | null
  uncertainty_high_c: number | null
  warnings: ColumnType<unknown, string, string>
  criteria_id: string
  criteria_version: number
  /** A manager's corrected band (1..4) with its reason, who and when; `band` keeps what the engine computed. */
  reviewed_band: number | null
  review_reason: string | null
  reviewed_by: string | null
  reviewed_at: Date | null
  /** Set when a repair's verification passed; an open finding has closed_at null. */
  closed_at: Date | null
  closed_reason: string | null
  /** The surface-library entry whose ε was used, if one was picked. */
  surface_id: string | null
  archived_at: Date | null
  /**
   * Copies kept by PostgreSQL (migration 20261205_0100) so the findings list filters and sorts on one table: the
   * check's survey and asset, the asset's site, the survey's date, state and archive, and the effective band
   * (reviewed band where there is one, else band). Never written by the app.
   */
  survey_id: ColumnType<string, never, never>
  asset_id: ColumnType<string, never, never>
  site_id: ColumnType<string, never, never>
  survey_planned_for: ColumnType<Date, never, never>
  survey_state: ColumnType<'planned' | 'in_progress' | 'submitted' | 'reviewed' | 'returned', never, never>
  survey_archived: ColumnType<boolean, never, never>
  effective_band: ColumnType<number | null, never, never>
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type FindingRow = Selectable<FindingsTable>
export type NewFinding = Insertable<FindingsTable>
export type FindingUpdate = Updateable<FindingsTable>
