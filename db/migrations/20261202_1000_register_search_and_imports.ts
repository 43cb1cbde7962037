import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
// Indexes that keep the asset register's server-side lists fast for an organisation with ~100 000 assets,
// structured site safety flags, and the staging tables of the CSV import.
export async function up(db: Kysely<any>): Promise<void> {
  // Both extensions are "trusted" (PostgreSQL 13+): the database owner may create them without superuser rights.
  await sql`create extension if not exists pg_trgm`.execute(db)
  // btree_gin lets one GIN index start with organisation_id, so a search never wades through other tenants' rows.
  await sql`create extension if not exists btree_gin`.execute(db)

  await db.schema.alterTable('sites')
    .addColumn('safety_flags', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .execute()

  // Active rows are what lists show by default; partial indexes keep archived history out of the hot path.
  await sql`create index sites_active_name_idx on sites (organisation_id, lower(name), id) where archived_at is null`.execute(db)
  await sql`create index sites_search_trgm_idx on sites using gin (organisation_id, (code || ' ' || name) gin_trgm_ops)`.execute(db)

  // INCLUDE (label): the planner only reads an expression index without the table when the column behind the
  // expression is in the index too; then a late page or a sorted first group never touches the table.
  await sql`create index assets_active_label_idx on assets (organisation_id, lower(label), id) include (label) where archived_at is null`.execute(db)
  await sql`create index assets_active_site_label_idx on assets (organisation_id, site_id, lower(label), id) where archived_at is null`.execute(db)
  await sql`create index assets_active_class_idx on assets (organisation_id, asset_class, lower(label), id) include (label) where archived_at is null`.execute(db)
  await sql`create index assets_active_criticality_idx on assets (organisation_id, criticality, lower(label), id) include (label) where archived_at is null`.execute(db)
  await sql`create index assets_active_condition_idx on assets (organisation_id, condition, lower(label), id) include (label) where archived_at is null`.execute(db)
  await sql`create index assets_active_updated_idx on assets (organisation_id, updated_at, id) where archived_at is null`.execute(db)
  await sql`create index assets_search_trgm_idx on assets using gin (organisation_id, (label || ' ' || manufacturer || ' ' || model) gin_trgm_ops)`.execute(db)

  // One upload of a CSV file: rows are staged, checked, then committed all at once (or never).
  await db.schema
    .createTable('register_imports')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('created_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('sites', 'assets')`))
    .addColumn('file_name', 'text', (c) => c.notNull())
    // Sizes in characters of the decoded text (what the browser sends), not bytes on disk.
    .addColumn('total_chars', 'integer', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('receiving').check(sql`status in ('receiving', 'checked', 'committed')`))
    .addColumn('columns', sql`text[]`)
    .addColumn('file_problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('chunks_received', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('received_chars', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('records_seen', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('row_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('bad_row_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('inserted_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('checked_at', 'timestamptz')
    .addColumn('committed_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('register_imports_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('register_imports_org_created_idx').on('register_imports').columns(['organisation_id', 'created_at']).execute()

  await db.schema
    .createTable('register_import_rows')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull())
    .addColumn('import_id', 'uuid', (c) => c.notNull())
    // The row's number as a spreadsheet shows it (the header is row 1).
    .addColumn('row_no', 'integer', (c) => c.notNull())
    // Site code (sites and assets) and asset label: the keys the duplicate and reference checks join on.
    .addColumn('key_code', 'text')
    .addColumn('key_label', 'text')
    .addColumn('data', 'jsonb')
    .addColumn('problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('cross_problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addPrimaryKeyConstraint('register_import_rows_pkey', ['import_id', 'row_no'])
    .addForeignKeyConstraint('register_import_rows_import_fkey', ['organisation_id', 'import_id'], 'register_imports', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .execute()
  await db.schema.createIndex('register_import_rows_keys_idx').on('register_import_rows').columns(['import_id', 'key_code', 'key_label']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('register_import_rows').ifExists().execute()
  await db.schema.dropTable('register_imports').ifExists().execute()
  for (const name of ['assets_search_trgm_idx', 'assets_active_updated_idx', 'assets_active_condition_idx', 'assets_active_criticality_idx',
    'assets_active_class_idx', 'assets_active_site_label_idx', 'assets_active_label_idx', 'sites_search_trgm_idx', 'sites_active_name_idx']) {
    await db.schema.dropIndex(name).ifExists().execute()
  }
  await db.schema.alterTable('sites').dropColumn('safety_flags').execute()
}
