import type { ColumnType, Insertable, Selectable } from 'kysely'

/** Crew members (or others) assigned to a work order. */
export interface WorkOrderAssigneesTable {
  organisation_id: string
  work_order_id: string
  user_id: string
  created_at: ColumnType<Date, never, never>
}
export type WorkOrderAssigneeRow = Selectable<WorkOrderAssigneesTable>
export type NewWorkOrderAssignee = Insertable<WorkOrderAssigneesTable>
