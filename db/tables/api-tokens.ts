import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

export type ApiTokenScope = 'read' | 'read_write'

/** An organisation API token: only the SHA-256 of its secret is kept. */
export interface ApiTokensTable {
  id: Generated<string>
  organisation_id: string
  name: string
  scope: ApiTokenScope
  token_hash: string
  token_hint: string
  created_by: string
  created_at: ColumnType<Date, never, never>
  last_used_at: ColumnType<Date | null, never, Date | string | null>
  revoked_at: ColumnType<Date | null, never, Date | string | null>
  revoked_by: string | null
}
export type ApiTokenRow = Selectable<ApiTokensTable>
export type NewApiToken = Insertable<ApiTokensTable>

/** One request made with a token (the audit trail). */
export interface ApiTokenRequestsTable {
  id: Generated<string>
  organisation_id: string
  token_id: string
  method: string
  path: string
  status: number
  created_at: ColumnType<Date, never, never>
}

/** Requests per token per one-minute window (the rate limit). */
export interface ApiTokenWindowsTable {
  organisation_id: string
  token_id: string
  window_start: Date | string
  count: number
}
