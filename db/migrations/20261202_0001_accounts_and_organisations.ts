import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('users')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('password_hash', 'text', (c) => c.notNull())
    .addColumn('temperature_unit', 'text', (c) => c.notNull().defaultTo('C').check(sql`temperature_unit in ('C', 'F')`))
    .addColumn('length_unit', 'text', (c) => c.notNull().defaultTo('m').check(sql`length_unit in ('m', 'ft')`))
    .addColumn('time_zone', 'text', (c) => c.notNull().defaultTo('UTC'))
    .addColumn('password_changed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  // E-mail addresses are compared case-insensitively: one account per address.
  await sql`create unique index users_email_lower_key on users (lower(email))`.execute(db)

  await db.schema
    .createTable('organisations')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('slug', 'text', (c) => c.notNull().unique())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('load_exponent', 'numeric(3, 2)', (c) => c.notNull().defaultTo(2).check(sql`load_exponent between 1.5 and 2.0`))
    .addColumn('time_zone', 'text', (c) => c.notNull().defaultTo('UTC'))
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()

  await db.schema
    .createTable('memberships')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('role', 'text', (c) =>
      c.notNull().check(sql`role in ('owner', 'manager', 'thermographer', 'crew', 'viewer')`))
    // Removed members are kept (removed_at set) so history keeps its names and a stale session gets a clear answer.
    .addColumn('removed_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('memberships_pkey', ['organisation_id', 'user_id'])
    .execute()
  await db.schema.createIndex('memberships_user_id_idx').on('memberships').column('user_id').execute()

  await db.schema
    .createTable('invitations')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) =>
      c.notNull().check(sql`role in ('owner', 'manager', 'thermographer', 'crew', 'viewer')`))
    // Only a hash of the token is stored: a database leak does not hand out working links.
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('invited_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('status', 'text', (c) =>
      c.notNull().defaultTo('pending').check(sql`status in ('pending', 'accepted', 'revoked')`))
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('sent_count', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('last_sent_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('accepted_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('accepted_at', 'timestamptz')
    .addColumn('revoked_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('invitations_organisation_id_idx').on('invitations').column('organisation_id').execute()
  // One pending invitation per address and organisation.
  await sql`create unique index invitations_pending_email_key on invitations (organisation_id, lower(email)) where status = 'pending'`.execute(db)

  await db.schema
    .createTable('password_resets')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('used_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('password_resets_user_id_idx').on('password_resets').column('user_id').execute()

  await db.schema
    .createTable('sign_in_failures')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('address', 'text', (c) => c.notNull())
    .addColumn('failed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await sql`create index sign_in_failures_email_idx on sign_in_failures (lower(email), failed_at)`.execute(db)
  await db.schema.createIndex('sign_in_failures_address_idx').on('sign_in_failures').columns(['address', 'failed_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['sign_in_failures', 'password_resets', 'invitations', 'memberships', 'organisations', 'users']) {
    await db.schema.dropTable(t).ifExists().execute()
  }
}
