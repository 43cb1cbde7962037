import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

export interface PasswordResetsTable {
  id: Generated<string>
  user_id: string
  token_hash: string
  expires_at: ColumnType<Date, Date | string, Date | string>
  used_at: Date | null
  created_at: ColumnType<Date, never, never>
}
export type PasswordReset = Selectable<PasswordResetsTable>
export type NewPasswordReset = Insertable<PasswordResetsTable>
