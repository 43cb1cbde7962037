import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('sites')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('kind', 'text', (c) =>
      c.notNull().check(sql`kind in ('substation', 'switchyard', 'plant_room', 'line_section')`))
    .addColumn('latitude', 'double precision', (c) => c.check(sql`latitude between -90 and 90`))
    .addColumn('longitude', 'double precision', (c) => c.check(sql`longitude between -180 and 180`))
    .addColumn('voltage_kv', 'numeric(8, 2)')
    .addColumn('access_notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('safety_notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // Composite key lets child tables reference (organisation_id, id), so a row can never point into another tenant.
    .addUniqueConstraint('sites_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('sites_org_code_key', ['organisation_id', 'code'])
    .execute()
  await db.schema.createIndex('sites_organisation_id_idx').on('sites').column('organisation_id').execute()

  await db.schema
    .createTable('assets')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('site_id', 'uuid', (c) => c.notNull())
    .addColumn('label', 'text', (c) => c.notNull())
    .addColumn('asset_class', 'text', (c) => c.notNull())
    .addColumn('manufacturer', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('model', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('voltage_kv', 'numeric(8, 2)')
    .addColumn('rated_current_a', 'numeric(10, 1)')
    .addColumn('criticality', 'smallint', (c) => c.notNull().defaultTo(3).check(sql`criticality between 1 and 5`))
    .addColumn('condition', 'smallint', (c) => c.notNull().defaultTo(1).check(sql`condition between 1 and 3`))
    .addColumn('components', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{A,B,C}'::text[]`))
    .addColumn('interval_months', 'smallint', (c) => c.check(sql`interval_months between 1 and 60`))
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addForeignKeyConstraint('assets_site_fkey', ['organisation_id', 'site_id'], 'sites', ['organisation_id', 'id'])
    .addUniqueConstraint('assets_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('assets_site_label_key', ['organisation_id', 'site_id', 'label'])
    .execute()
  await db.schema.createIndex('assets_organisation_id_idx').on('assets').columns(['organisation_id', 'site_id']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('assets').ifExists().execute()
  await db.schema.dropTable('sites').ifExists().execute()
}
