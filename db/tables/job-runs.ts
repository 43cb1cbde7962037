import type { ColumnType, Insertable, Selectable } from 'kysely'

export interface JobRunsTable {
  job: string
  slot: string
  claimed_by: string
  claimed_at: ColumnType<Date, Date | string | undefined, never>
  finished_at: Date | null
  summary: ColumnType<Record<string, unknown> | null, string | null | undefined, string | null>
}
export type JobRunRow = Selectable<JobRunsTable>
export type NewJobRun = Insertable<JobRunsTable>
