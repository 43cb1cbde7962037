import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export interface AssetsTable {
  id: Generated<string>
  organisation_id: string
  site_id: string
  label: string
  asset_class: string
  manufacturer: Generated<string>
  model: Generated<string>
  voltage_kv: ColumnType<string | null, number | string | null | undefined, number | string | null>
  rated_current_a: ColumnType<string | null, number | string | null | undefined, number | string | null>
  criticality: Generated<number>
  condition: Generated<number>
  components: Generated<string[]>
  interval_months: number | null
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Asset = Selectable<AssetsTable>
export type NewAsset = Insertable<AssetsTable>
export type AssetUpdate = Updateable<AssetsTable>
