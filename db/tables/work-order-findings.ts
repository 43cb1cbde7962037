import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

/** The findings a work order repairs (same site). */
export interface WorkOrderFindingsTable {
  id: Generated<string>
  organisation_id: string
  work_order_id: string
  finding_id: string
  created_at: ColumnType<Date, never, never>
}
export type WorkOrderFindingRow = Selectable<WorkOrderFindingsTable>
export type NewWorkOrderFinding = Insertable<WorkOrderFindingsTable>
