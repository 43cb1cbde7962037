import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export interface RoutesTable {
  id: Generated<string>
  organisation_id: string
  name: string
  base_name: string
  base_latitude: number
  base_longitude: number
  recurrence_months: Generated<number>
  thermographer_id: string | null
  instrument_id: string | null
  notes: Generated<string>
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type RouteRow = Selectable<RoutesTable>
export type NewRoute = Insertable<RoutesTable>
export type RouteUpdate = Updateable<RoutesTable>
