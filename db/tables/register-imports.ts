import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export type RegisterImportKind = 'sites' | 'assets'
export type RegisterImportStatus = 'receiving' | 'checked' | 'committed'
/** A problem found in a CSV file: the column it concerns (or '' for the whole file) and a plain message. */
export interface StoredProblem { field: string; message: string }

export interface RegisterImportsTable {
  id: Generated<string>
  organisation_id: string
  created_by: string | null
  kind: RegisterImportKind
  file_name: string
  total_chars: number
  status: Generated<RegisterImportStatus>
  columns: string[] | null
  file_problems: ColumnType<StoredProblem[], string | undefined, string>
  chunks_received: Generated<number>
  received_chars: Generated<number>
  records_seen: Generated<number>
  row_count: Generated<number>
  bad_row_count: Generated<number>
  inserted_count: Generated<number>
  checked_at: Date | null
  committed_at: Date | null
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type RegisterImport = Selectable<RegisterImportsTable>
export type NewRegisterImport = Insertable<RegisterImportsTable>
export type RegisterImportUpdate = Updateable<RegisterImportsTable>
