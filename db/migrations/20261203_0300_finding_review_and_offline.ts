import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // Review of a finding's band by a manager, closing by a passed verification, surface used for ε, archiving.
  await db.schema
    .alterTable('findings')
    .addColumn('reviewed_band', 'smallint')
    .addColumn('review_reason', 'text')
    .addColumn('reviewed_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('reviewed_at', 'timestamptz')
    .addColumn('closed_at', 'timestamptz')
    .addColumn('closed_reason', 'text')
    .addColumn('surface_id', 'uuid')
    .addColumn('archived_at', 'timestamptz')
    .execute()
  await sql`alter table findings add constraint findings_reviewed_band_range check (reviewed_band is null or reviewed_band between 1 and 4)`.execute(db)
  // A corrected band always carries its reason, who and when.
  await sql`alter table findings add constraint findings_review_complete check ((reviewed_band is null) or (review_reason is not null and reviewed_at is not null))`.execute(db)
  await sql`alter table findings add constraint findings_surface_fkey foreign key (organisation_id, surface_id) references surfaces (organisation_id, id)`.execute(db)
  // Open findings (closed_at is null) are read per organisation by the schedule and programme.
  await sql`create index findings_organisation_open_idx on findings (organisation_id, check_id) where closed_at is null and archived_at is null`.execute(db)

  // The first answer to each offline-queued write, so a replay gets the same answer without writing again.
  await db.schema
    .createTable('idempotency_keys')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('key', 'text', (c) => c.notNull().check(sql`length(key) between 8 and 200`))
    .addColumn('route', 'text', (c) => c.notNull())
    .addColumn('request_hash', 'text', (c) => c.notNull())
    // Null while the first request is still being handled (a claim); set once it has answered.
    .addColumn('status_code', 'integer')
    .addColumn('response', 'jsonb')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('idempotency_keys_org_user_key', ['organisation_id', 'user_id', 'key'])
    .addUniqueConstraint('idempotency_keys_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('idempotency_keys_organisation_created_idx').on('idempotency_keys').columns(['organisation_id', 'created_at']).execute()

  // Asset history and last-check lookups read checks per asset newest first.
  await db.schema.createIndex('checks_organisation_asset_created_idx').on('checks').columns(['organisation_id', 'asset_id', 'created_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropIndex('checks_organisation_asset_created_idx').ifExists().execute()
  await db.schema.dropTable('idempotency_keys').ifExists().execute()
  await sql`drop index if exists findings_organisation_open_idx`.execute(db)
  await db.schema
    .alterTable('findings')
    .dropConstraint('findings_surface_fkey')
    .execute()
  await db.schema
    .alterTable('findings')
    .dropConstraint('findings_review_complete')
    .execute()
  await db.schema
    .alterTable('findings')
    .dropConstraint('findings_reviewed_band_range')
    .execute()
  for (const c of ['archived_at', 'surface_id', 'closed_reason', 'closed_at', 'reviewed_at', 'reviewed_by', 'review_reason', 'reviewed_band']) {
    await db.schema.alterTable('findings').dropColumn(c).execute()
  }
}
