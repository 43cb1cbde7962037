import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** The outcome of looking at one asset during one survey. */
export interface ChecksTable {
  id: Generated<string>
  organisation_id: string
  survey_id: string
  asset_id: string
  outcome: 'clear' | 'finding' | 'not_reached'
  reason: 'no_access' | 'de_energised' | 'outage' | 'unsafe' | 'other' | null
  note: Generated<string>
  checked_by: string | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type CheckRow = Selectable<ChecksTable>
export type NewCheck = Insertable<ChecksTable>
export type CheckUpdate = Updateable<ChecksTable>
