import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** One site of a survey in visiting order, with the field conditions found there. */
export interface SurveySitesTable {
  id: Generated<string>
  organisation_id: string
  survey_id: string
  site_id: string
  position: number
  ambient_c: ColumnType<string | null, number | null | undefined, number | null>
  wind_ms: ColumnType<string | null, number | null | undefined, number | null>
  humidity_pct: ColumnType<string | null, number | null | undefined, number | null>
  sky: string | null
  load_notes: Generated<string>
  version: Generated<number>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type SurveySiteRow = Selectable<SurveySitesTable>
export type NewSurveySite = Insertable<SurveySitesTable>
export type SurveySiteUpdate = Updateable<SurveySitesTable>
