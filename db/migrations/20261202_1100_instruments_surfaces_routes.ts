import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // Programme settings of an organisation: travel estimate and inspection intervals.
  await db.schema
    .alterTable('organisations')
    .addColumn('road_factor', 'numeric(4, 2)', (c) => c.notNull().defaultTo(1.3).check(sql`road_factor between 1 and 3`))
    .addColumn('average_speed_kmh', 'numeric(5, 1)', (c) => c.notNull().defaultTo(60).check(sql`average_speed_kmh between 5 and 150`))
    .addColumn('interval_months_normal', 'smallint', (c) => c.notNull().defaultTo(12).check(sql`interval_months_normal between 1 and 60`))
    .addColumn('interval_months_condition3', 'smallint', (c) => c.notNull().defaultTo(6).check(sql`interval_months_condition3 between 1 and 60`))
    .addColumn('monitor_bands', sql`smallint[]`, (c) => c.notNull().defaultTo(sql`'{2}'::smallint[]`).check(sql`monitor_bands <@ '{1,2,3,4}'::smallint[]`))
    .addColumn('monitor_factor', 'numeric(3, 2)', (c) => c.notNull().defaultTo(0.5).check(sql`monitor_factor > 0 and monitor_factor <= 1`))
    .execute()

  await db.schema
    .createTable('instruments')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('make', 'text', (c) => c.notNull())
    .addColumn('model', 'text', (c) => c.notNull())
    .addColumn('serial', 'text', (c) => c.notNull())
    .addColumn('band_from_um', 'numeric(5, 2)', (c) => c.notNull())
    .addColumn('band_to_um', 'numeric(5, 2)', (c) => c.notNull())
    .addColumn('ifov_mrad', 'numeric(6, 3)')
    .addColumn('accuracy_k', 'numeric(4, 2)')
    .addColumn('accuracy_pct', 'numeric(4, 2)')
    .addColumn('calibration_due', 'date')
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('instruments_band_range_check', sql`band_from_um >= 0.5 and band_to_um <= 30 and band_from_um < band_to_um`)
    .addCheckConstraint('instruments_ifov_check', sql`ifov_mrad is null or ifov_mrad > 0`)
    .addCheckConstraint('instruments_accuracy_check', sql`(accuracy_k is null or accuracy_k >= 0) and (accuracy_pct is null or accuracy_pct >= 0)`)
    .addUniqueConstraint('instruments_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('instruments_organisation_id_idx').on('instruments').columns(['organisation_id', 'make', 'model']).execute()
  // One active record per physical imager.
  await sql`create unique index instruments_active_serial_key on instruments (organisation_id, lower(make), lower(serial)) where archived_at is null`.execute(db)

  await db.schema
    .createTable('surfaces')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    // Seeded rows keep the library key they were made from; measured rows have none.
    .addColumn('seed_key', 'text')
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('emissivity', 'numeric(4, 3)', (c) => c.notNull().check(sql`emissivity > 0 and emissivity <= 1`))
    .addColumn('range_low', 'numeric(4, 3)')
    .addColumn('range_high', 'numeric(4, 3)')
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('provenance', 'text', (c) =>
      c.notNull().check(sql`provenance in ('published', 'from memory', 'common practice', 'measured')`))
    .addColumn('method', 'text', (c) => c.check(sql`method in ('contact_thermometer', 'reference_emitter')`))
    .addColumn('measured_on', 'date')
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // A measured value says how it was measured (ASTM E1933); a published one says where it was read.
    .addCheckConstraint('surfaces_measured_method_check', sql`(provenance = 'measured') = (method is not null)`)
    .addCheckConstraint('surfaces_range_order_check', sql`(range_low is null) = (range_high is null) and (range_low is null or range_low <= range_high)`)
    .addUniqueConstraint('surfaces_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('surfaces_organisation_id_idx').on('surfaces').columns(['organisation_id', 'name']).execute()
  await sql`create unique index surfaces_seed_key on surfaces (organisation_id, seed_key) where seed_key is not null`.execute(db)

  await db.schema
    .createTable('routes')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('base_name', 'text', (c) => c.notNull())
    .addColumn('base_latitude', 'double precision', (c) => c.notNull().check(sql`base_latitude between -90 and 90`))
    .addColumn('base_longitude', 'double precision', (c) => c.notNull().check(sql`base_longitude between -180 and 180`))
    .addColumn('recurrence_months', 'smallint', (c) => c.notNull().defaultTo(12).check(sql`recurrence_months between 1 and 60`))
    .addColumn('thermographer_id', 'uuid')
    .addColumn('instrument_id', 'uuid')
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // Composite keys: the assigned person and imager can only be of the same organisation.
    .addForeignKeyConstraint('routes_thermographer_fkey', ['organisation_id', 'thermographer_id'], 'memberships', ['organisation_id', 'user_id'])
    .addForeignKeyConstraint('routes_instrument_fkey', ['organisation_id', 'instrument_id'], 'instruments', ['organisation_id', 'id'])
    .addUniqueConstraint('routes_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('routes_organisation_id_idx').on('routes').columns(['organisation_id', 'name']).execute()

  await db.schema
    .createTable('route_stops')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull())
    .addColumn('route_id', 'uuid', (c) => c.notNull())
    .addColumn('site_id', 'uuid', (c) => c.notNull())
    .addColumn('position', 'smallint', (c) => c.notNull().check(sql`position >= 0`))
    .addPrimaryKeyConstraint('route_stops_pkey', ['route_id', 'position'])
    .addForeignKeyConstraint('route_stops_route_fkey', ['organisation_id', 'route_id'], 'routes', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .addForeignKeyConstraint('route_stops_site_fkey', ['organisation_id', 'site_id'], 'sites', ['organisation_id', 'id'])
    .addUniqueConstraint('route_stops_route_site_key', ['route_id', 'site_id'])
    .execute()
  await db.schema.createIndex('route_stops_organisation_site_idx').on('route_stops').columns(['organisation_id', 'site_id']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['route_stops', 'routes', 'surfaces', 'instruments']) await db.schema.dropTable(t).ifExists().execute()
  await db.schema.alterTable('organisations')
    .dropColumn('road_factor').dropColumn('average_speed_kmh').dropColumn('interval_months_normal')
    .dropColumn('interval_months_condition3').dropColumn('monitor_bands').dropColumn('monitor_factor')
    .execute()
}
