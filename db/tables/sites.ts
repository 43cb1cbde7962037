import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export type SiteKind = 'substation' | 'switchyard' | 'plant_room' | 'line_section'
export interface SitesTable {
  id: Generated<string>
  organisation_id: string
  code: string
  name: string
  kind: SiteKind
  latitude: number | null
  longitude: number | null
  voltage_kv: ColumnType<string | null, number | string | null | undefined, number | string | null>
  access_notes: Generated<string>
  safety_notes: Generated<string>
  /** Structured safety facts shown wherever the site is visited (shared/register.ts SITE_SAFETY_FLAGS). */
  safety_flags: Generated<string[]>
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Site = Selectable<SitesTable>
export type NewSite = Insertable<SitesTable>
export type SiteUpdate = Updateable<SitesTable>
