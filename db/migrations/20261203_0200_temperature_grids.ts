import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
// A temperature grid: a CSV matrix of apparent temperatures uploaded for one asset on one survey, kept in object
// storage as little-endian Float32 °C; the row holds its shape, range, the marked regions and the finding it backs.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('temperature_grids')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('survey_id', 'uuid', (c) => c.notNull())
    .addColumn('asset_id', 'uuid', (c) => c.notNull())
    .addColumn('finding_id', 'uuid')
    .addColumn('width', 'integer', (c) => c.notNull())
    .addColumn('height', 'integer', (c) => c.notNull())
    .addColumn('source_unit', 'text', (c) => c.notNull())
    .addColumn('file_name', 'text', (c) => c.notNull())
    .addColumn('min_c', 'double precision', (c) => c.notNull())
    .addColumn('max_c', 'double precision', (c) => c.notNull())
    .addColumn('object_key', 'text', (c) => c.notNull())
    .addColumn('hot_region', 'jsonb')
    .addColumn('reference_region', 'jsonb')
    .addColumn('created_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('archived_at', 'timestamptz')
    .addCheckConstraint('temperature_grids_shape_limits', sql`width between 2 and 1280 and height between 2 and 1024`)
    .addCheckConstraint('temperature_grids_unit_known', sql`source_unit in ('C', 'F')`)
    .addCheckConstraint('temperature_grids_range_order', sql`min_c <= max_c and min_c >= -60 and max_c <= 2000`)
    .addForeignKeyConstraint('temperature_grids_survey_fkey', ['organisation_id', 'survey_id'], 'surveys', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .addForeignKeyConstraint('temperature_grids_asset_fkey', ['organisation_id', 'asset_id'], 'assets', ['organisation_id', 'id'])
    .addForeignKeyConstraint('temperature_grids_finding_fkey', ['organisation_id', 'finding_id'], 'findings', ['organisation_id', 'id'])
    .addUniqueConstraint('temperature_grids_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('temperature_grids_organisation_survey_idx').on('temperature_grids').columns(['organisation_id', 'survey_id', 'asset_id']).execute()
  await db.schema.createIndex('temperature_grids_organisation_finding_idx').on('temperature_grids').columns(['organisation_id', 'finding_id']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('temperature_grids').ifExists().execute()
}
