import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

/** One entry of an organisation's audit log (append-only: the database refuses UPDATE and DELETE). */
export interface AuditEventsTable {
  id: Generated<string>
  organisation_id: string
  at: ColumnType<Date, Date | string | undefined, never>
  actor_id: string | null
  actor_label: Generated<string>
  actor_token_id: string | null
  action: string
  target_kind: Generated<string>
  target_id: string | null
  target_label: Generated<string>
  details: ColumnType<Record<string, unknown>, string | undefined, never>
  ip: string | null
  user_agent: string | null
}
export type AuditEventRow = Selectable<AuditEventsTable>
export type NewAuditEvent = Insertable<AuditEventsTable>

/** One sign-in, sign-out or password change of a person (append-only). */
export interface AccountEventsTable {
  id: Generated<string>
  user_id: string | null
  email: string
  action: string
  ip: string | null
  user_agent: string | null
  at: ColumnType<Date, Date | string | undefined, never>
}
export type AccountEventRow = Selectable<AccountEventsTable>
