import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

export type RecordSubjectKind = 'finding' | 'work_order' | 'verification'

/** One entry of the append-only timeline: who did what to which record, when and why. */
export interface RecordEventsTable {
  id: Generated<string>
  organisation_id: string
  subject_kind: RecordSubjectKind
  subject_id: string
  work_order_id: string | null
  actor_id: string | null
  action: string
  reason: Generated<string>
  details: ColumnType<Record<string, unknown>, string | undefined, never>
  created_at: ColumnType<Date, Date | string | undefined, never>
}
export type RecordEventRow = Selectable<RecordEventsTable>
export type NewRecordEvent = Insertable<RecordEventsTable>
