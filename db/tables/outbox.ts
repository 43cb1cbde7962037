import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export type OutboxState = 'waiting' | 'sending' | 'sent' | 'failed'

export interface OutboxTable {
  id: Generated<string>
  organisation_id: string
  user_id: string | null
  kind: Generated<string>
  to_address: string
  subject: string
  text: string
  html: string | null
  headers: ColumnType<Record<string, string>, string | undefined, string>
  dedupe_key: string
  state: Generated<OutboxState>
  attempts: Generated<number>
  next_attempt_at: ColumnType<Date, Date | string | undefined, Date | string>
  last_error: string | null
  sent_at: Date | null
  created_at: ColumnType<Date, Date | string | undefined, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type OutboxRow = Selectable<OutboxTable>
export type NewOutboxRow = Insertable<OutboxTable>
export type OutboxUpdate = Updateable<OutboxTable>
