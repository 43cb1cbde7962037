import type { ColumnType, Insertable, Selectable } from 'kysely'

export interface NoticePreferencesTable {
  organisation_id: string
  user_id: string
  kind: string
  by_email: boolean
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type NoticePreferenceRow = Selectable<NoticePreferencesTable>
export type NewNoticePreference = Insertable<NoticePreferencesTable>
