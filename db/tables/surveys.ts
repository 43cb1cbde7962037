import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** State of a survey: planned → in_progress → submitted → reviewed, or returned to the thermographer. */
export type SurveyState = 'planned' | 'in_progress' | 'submitted' | 'reviewed' | 'returned'

export interface SurveysTable {
  id: Generated<string>
  organisation_id: string
  route_id: string | null
  planned_for: ColumnType<Date, string, string>
  thermographer_id: string
  instrument_id: string
  state: Generated<SurveyState>
  review_comments: Generated<string>
  reviewed_by: string | null
  started_at: Date | null
  submitted_at: Date | null
  reviewed_at: Date | null
  created_by: string | null
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type SurveyRow = Selectable<SurveysTable>
export type NewSurvey = Insertable<SurveysTable>
export type SurveyUpdate = Updateable<SurveysTable>
