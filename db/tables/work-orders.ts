import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** State of a work order: open → planned → in_repair → awaiting_verification → closed; or deferred / cancelled. */
export type WorkOrderState = 'open' | 'planned' | 'in_repair' | 'awaiting_verification' | 'closed' | 'deferred' | 'cancelled'

/** A repair job raised from one or more findings of one site. */
export interface WorkOrdersTable {
  id: Generated<string>
  organisation_id: string
  site_id: string
  /** Per-organisation running number (shown as WO-<number>). */
  number: number
  title: string
  instructions: Generated<string>
  state: Generated<WorkOrderState>
  /** Most severe (effective) band of its findings; 1 is the most severe. */
  band: number | null
  due_on: ColumnType<string | null, string | null | undefined, string | null>
  /** Why the last state change happened (defer / cancel / reopen reason). */
  state_reason: Generated<string>
  deferred_until: ColumnType<string | null, string | null | undefined, string | null>
  cause_found: Generated<string>
  parts: Generated<string>
  work_done: Generated<string>
  time_spent_minutes: number | null
  created_by: string | null
  closed_at: Date | null
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type WorkOrderRow = Selectable<WorkOrdersTable>
export type NewWorkOrder = Insertable<WorkOrdersTable>
export type WorkOrderUpdate = Updateable<WorkOrdersTable>
