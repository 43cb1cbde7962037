import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** State of a report job: queued → running → ready, or failed with its error. */
export type SurveyReportState = 'queued' | 'running' | 'ready' | 'failed'

/** A survey report (PDF) made in the background and kept in object storage under the organisation's prefix. */
export interface SurveyReportsTable {
  id: Generated<string>
  organisation_id: string
  survey_id: string
  state: Generated<SurveyReportState>
  /** 0..100 while running; 100 when ready. */
  progress: Generated<number>
  include_images: Generated<boolean>
  object_key: string | null
  size_bytes: ColumnType<string | null, number | null | undefined, number | null>
  page_count: number | null
  finding_count: number | null
  image_count: number | null
  error: string | null
  attempts: Generated<number>
  requested_by: string | null
  created_at: ColumnType<Date, never, never>
  started_at: Date | null
  heartbeat_at: Date | null
  finished_at: Date | null
}
export type SurveyReportRow = Selectable<SurveyReportsTable>
export type NewSurveyReport = Insertable<SurveyReportsTable>
export type SurveyReportUpdate = Updateable<SurveyReportsTable>
