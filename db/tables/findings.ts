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
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type FindingRow = Selectable<FindingsTable>
export type NewFinding = Insertable<FindingsTable>
export type FindingUpdate = Updateable<FindingsTable>
