import type { ColumnType, Insertable, Selectable, Updateable } from 'kysely'
import type { StoredProblem } from './register-imports'

export interface RegisterImportRowsTable {
  organisation_id: string
  import_id: string
  /** Row number as a spreadsheet shows it (header = 1). */
  row_no: number
  key_code: string | null
  key_label: string | null
  /** The row's values after validation (camelCase, as the API takes them); null when the row is invalid. */
  data: ColumnType<Record<string, unknown> | null, string | null, string | null>
  problems: ColumnType<StoredProblem[], string | undefined, string>
  cross_problems: ColumnType<StoredProblem[], string | undefined, string>
}
export type RegisterImportRow = Selectable<RegisterImportRowsTable>
export type NewRegisterImportRow = Insertable<RegisterImportRowsTable>
export type RegisterImportRowUpdate = Updateable<RegisterImportRowsTable>
