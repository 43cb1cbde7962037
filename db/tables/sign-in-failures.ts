import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

export interface SignInFailuresTable {
  id: Generated<string>
  email: string
  address: string
  failed_at: ColumnType<Date, Date | string | undefined, never>
}
export type SignInFailure = Selectable<SignInFailuresTable>
export type NewSignInFailure = Insertable<SignInFailuresTable>
