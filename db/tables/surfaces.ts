import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

type NullableNumeric = ColumnType<string | null, number | string | null | undefined, number | string | null>

export type SurfaceProvenance = 'published' | 'from memory' | 'common practice' | 'measured'
/** ASTM E1933 ways of finding ε on the part: a contact thermometer, or a reference emitter (tape or paint) of known ε. */
export type SurfaceMethod = 'contact_thermometer' | 'reference_emitter'

export interface SurfacesTable {
  id: Generated<string>
  organisation_id: string
  seed_key: string | null
  name: string
  emissivity: ColumnType<string, number | string, number | string>
  range_low: NullableNumeric
  range_high: NullableNumeric
  source: string
  provenance: SurfaceProvenance
  method: SurfaceMethod | null
  measured_on: ColumnType<Date | null, string | null | undefined, string | null>
  notes: Generated<string>
  created_by: string | null
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type SurfaceRow = Selectable<SurfacesTable>
export type NewSurface = Insertable<SurfacesTable>
export type SurfaceUpdate = Updateable<SurfacesTable>
