import { sql, type Kysely } from 'kysely'

// Organisation API tokens, their request log and their rate-limit windows.
// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('api_tokens')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('scope', 'text', (c) => c.notNull().check(sql`scope in ('read', 'read_write')`))
    // SHA-256 (hex) of the whole secret; the secret itself is never stored.
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    // The first characters of the secret, shown so people can tell tokens apart.
    .addColumn('token_hint', 'text', (c) => c.notNull())
    .addColumn('created_by', 'uuid', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('last_used_at', 'timestamptz')
    .addColumn('revoked_at', 'timestamptz')
    .addColumn('revoked_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    // The creator must be a member of the same organisation.
    .addForeignKeyConstraint('api_tokens_creator_fkey', ['organisation_id', 'created_by'], 'memberships', ['organisation_id', 'user_id'])
    .addUniqueConstraint('api_tokens_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('api_tokens_organisation_idx').on('api_tokens').columns(['organisation_id', 'created_at']).execute()

  await db.schema
    .createTable('api_token_requests')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('token_id', 'uuid', (c) => c.notNull())
    .addColumn('method', 'text', (c) => c.notNull())
    .addColumn('path', 'text', (c) => c.notNull())
    .addColumn('status', 'smallint', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addForeignKeyConstraint('api_token_requests_token_fkey', ['organisation_id', 'token_id'], 'api_tokens', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .execute()
  await db.schema.createIndex('api_token_requests_organisation_idx').on('api_token_requests').columns(['organisation_id', 'token_id', 'created_at']).execute()

  // Fixed one-minute windows: one row per token and minute, counted with an atomic upsert.
  await db.schema
    .createTable('api_token_windows')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('token_id', 'uuid', (c) => c.notNull())
    .addColumn('window_start', 'timestamptz', (c) => c.notNull())
    .addColumn('count', 'integer', (c) => c.notNull().defaultTo(0))
    .addPrimaryKeyConstraint('api_token_windows_pkey', ['organisation_id', 'token_id', 'window_start'])
    .addForeignKeyConstraint('api_token_windows_token_fkey', ['organisation_id', 'token_id'], 'api_tokens', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['api_token_windows', 'api_token_requests', 'api_tokens']) await db.schema.dropTable(t).ifExists().execute()
}
