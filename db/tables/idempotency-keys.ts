import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

/** The first answer to a write sent with an Idempotency-Key, kept per (organisation, user, key) so replays get it back. */
export interface IdempotencyKeysTable {
  id: Generated<string>
  organisation_id: string
  user_id: string
  key: string
  route: string
  request_hash: string
  /** Null while the first request is still being handled. */
  status_code: number | null
  response: ColumnType<unknown, string | null, string | null>
  created_at: ColumnType<Date, never, never>
}
export type IdempotencyKeyRow = Selectable<IdempotencyKeysTable>
export type NewIdempotencyKey = Insertable<IdempotencyKeysTable>
