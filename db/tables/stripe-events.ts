import type { ColumnType, Insertable, Selectable } from 'kysely'

export interface StripeEventsTable {
  /** The provider's event id (evt_…). */
  id: string
  type: string
  organisation_id: string | null
  outcome: 'applied' | 'ignored'
  stripe_created_at: ColumnType<Date, Date | string, never>
  received_at: ColumnType<Date, never, never>
}
export type StripeEventRow = Selectable<StripeEventsTable>
export type NewStripeEventRow = Insertable<StripeEventsTable>
