import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

export interface NoticesTable {
  id: Generated<string>
  organisation_id: string
  user_id: string
  kind: string
  title: string
  body: Generated<string>
  link: Generated<string>
  dedupe_key: string
  read_at: Date | null
  created_at: ColumnType<Date, never, never>
}
export type NoticeRow = Selectable<NoticesTable>
export type NewNotice = Insertable<NoticesTable>
