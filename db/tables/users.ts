import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export interface UsersTable {
  id: Generated<string>
  email: string
  name: string
  password_hash: string
  temperature_unit: Generated<'C' | 'F'>
  length_unit: Generated<'m' | 'ft'>
  time_zone: Generated<string>
  password_changed_at: ColumnType<Date, Date | string | undefined, Date | string>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type User = Selectable<UsersTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
