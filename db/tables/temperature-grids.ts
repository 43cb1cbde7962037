import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** A region marked on a grid (pixel box, or the ellipse inscribed in it), stored as jsonb. */
export interface StoredGridRegion {
  shape: 'box' | 'ellipse'
  x: number
  y: number
  w: number
  h: number
}

/** A temperature grid uploaded for one asset on one survey; the values live in object storage (Float32 LE, °C). */
export interface TemperatureGridsTable {
  id: Generated<string>
  organisation_id: string
  survey_id: string
  asset_id: string
  finding_id: string | null
  width: number
  height: number
  source_unit: 'C' | 'F'
  file_name: string
  min_c: number
  max_c: number
  object_key: string
  hot_region: ColumnType<StoredGridRegion | null, string | null, string | null>
  reference_region: ColumnType<StoredGridRegion | null, string | null, string | null>
  created_by: string | null
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
  archived_at: Date | null
}
export type TemperatureGridRow = Selectable<TemperatureGridsTable>
export type NewTemperatureGrid = Insertable<TemperatureGridsTable>
export type TemperatureGridUpdate = Updateable<TemperatureGridsTable>
