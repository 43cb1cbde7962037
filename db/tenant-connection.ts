// Sets the tenant wall's setting (db/tenant-wall.ts) on each connection the app takes from its pool. Kept free of
// Nitro so the benchmark (scripts/bench/tenant-wall.bench.ts) runs the very code the app runs.
import { CompiledQuery, type DatabaseConnection } from 'kysely'

/** What a checkout may see: an organisation id, or '*' for system work outside any organisation's request. */
export type TenantSetting = string

export const SYSTEM_SETTING: TenantSetting = '*'

/**
 * A Kysely `onReserveConnection` hook: before a checkout runs anything (a query, or a whole transaction), the
 * connection's `greybody.org` is set to `current()`. Session-level (`set_config(…, false)`), so it stays on the
 * pooled connection: the round trip is skipped when the connection already holds that value. The call runs before
 * `begin`, so no rollback can undo it, and the value remembered is only the one PostgreSQL confirmed.
 */
export function tenantReserveHook(current: () => TenantSetting): (connection: DatabaseConnection) => Promise<void> {
  const held = new WeakMap<DatabaseConnection, TenantSetting>()
  return async (connection) => {
    const want = current()
    if (held.get(connection) === want) return
    held.delete(connection)
    await connection.executeQuery(CompiledQuery.raw(`select set_config('greybody.org', $1, false)`, [want]))
    held.set(connection, want)
  }
}
