// The tenant wall: PostgreSQL row-level security on a tenant table, behind the app's own organisation condition.
//
// Every table with an `organisation_id` column gets it, in the migration that creates the table:
//
//   import { addTenantWall } from '../tenant-wall'
//   …create table…
//   await addTenantWall(db, 'my_table')
//
// tests/e2e/row-security.test.ts fails for any table with an `organisation_id` column that lacks it.
//
// Who sees what is decided by the session setting `greybody.org`, which the app sets on every connection it takes
// from its pool (server/utils/db.ts):
//   - an organisation id → only that organisation's rows are visible, and only its rows can be written;
//   - '*'                → system work (sign-in, webhooks, workers, scheduler, migrations, scripts): every row;
//   - unset or empty     → nothing at all (a connection nobody configured sees no tenant data).
// The table owner (the app role) is held to the policy too (`force`), so a forgotten setting fails closed.
//
// Frozen like a migration: migrations that already ran call this, so what it emits for `tenant_wall` never changes.
// A different wall gets a new policy name and a new function here, and a new migration that switches to it.
import { sql, type Kysely } from 'kysely'

/** The setting the app and scripts set per connection: an organisation id, '*' for system work, or nothing. */
export const TENANT_SETTING = 'greybody.org'

/** The name of the policy every tenant table carries. */
export const TENANT_POLICY = 'tenant_wall'

// The setting is read once per statement (scalar subqueries become InitPlans) and compared as a uuid, so each row
// costs one uuid comparison, and the organisation indexes stay usable. '*' and '' cast to no uuid (null: no row
// matches); anything else that is not a uuid makes the statement fail instead of showing rows.
const TENANT_ROW = sql.raw(
  `organisation_id = (select nullif(nullif(current_setting('${TENANT_SETTING}', true), ''), '*')::uuid)` +
    ` or (select current_setting('${TENANT_SETTING}', true) = '*')`,
)

/** Enables and forces row-level security on a tenant table and adds the `tenant_wall` policy for reads and writes. */
export async function addTenantWall(db: Kysely<any>, table: string): Promise<void> {
  await sql`alter table ${sql.table(table)} enable row level security`.execute(db)
  await sql`alter table ${sql.table(table)} force row level security`.execute(db)
  await sql`create policy ${sql.id(TENANT_POLICY)} on ${sql.table(table)} for all using (${TENANT_ROW}) with check (${TENANT_ROW})`.execute(db)
}

/** Undoes addTenantWall (for a migration's `down`). */
export async function dropTenantWall(db: Kysely<any>, table: string): Promise<void> {
  await sql`drop policy if exists ${sql.id(TENANT_POLICY)} on ${sql.table(table)}`.execute(db)
  await sql`alter table ${sql.table(table)} no force row level security`.execute(db)
  await sql`alter table ${sql.table(table)} disable row level security`.execute(db)
}
