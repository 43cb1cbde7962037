import { sql, type Kysely } from 'kysely'

const READING_INPUTS_AND_RESULTS = [
  ['apparent_c', 'double precision'],
  ['reference_c', 'double precision'],
  ['ambient_c', 'double precision'],
  ['emissivity', 'double precision'],
  ['reflected_c', 'double precision'],
  ['reflected_method', 'text'],
  ['distance_m', 'double precision'],
  ['transmittance', 'double precision'],
  ['window_transmittance', 'double precision'],
  ['window_c', 'double precision'],
  ['load_a', 'double precision'],
  ['rated_a', 'double precision'],
  ['wind_ms', 'double precision'],
  ['object_c', 'double precision'],
  ['rise_over_reference_k', 'double precision'],
  ['rise_over_ambient_k', 'double precision'],
  ['load_scaled_rise_k', 'double precision'],
  ['band', 'smallint'],
  ['band_basis', 'text'],
  ['uncertainty_low_c', 'double precision'],
  ['uncertainty_high_c', 'double precision'],
  ['criteria_id', 'text'],
  ['criteria_version', 'integer'],
] as const

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // Repair deadline per band, in days, per organisation; null = record and trend (no due date).
  // Defaults from the reference sheet §6 (common practice): 1, 30, 180 days, none.
  await db.schema
    .alterTable('organisations')
    .addColumn('repair_days_band1', 'integer', (c) => c.defaultTo(1))
    .addColumn('repair_days_band2', 'integer', (c) => c.defaultTo(30))
    .addColumn('repair_days_band3', 'integer', (c) => c.defaultTo(180))
    .addColumn('repair_days_band4', 'integer')
    // Last work order number handed out; numbers are per organisation.
    .addColumn('work_order_counter', 'integer', (c) => c.notNull().defaultTo(0))
    .execute()
  await sql`alter table organisations add constraint organisations_repair_days_range check (
    (repair_days_band1 is null or repair_days_band1 between 0 and 3650) and
    (repair_days_band2 is null or repair_days_band2 between 0 and 3650) and
    (repair_days_band3 is null or repair_days_band3 between 0 and 3650) and
    (repair_days_band4 is null or repair_days_band4 between 0 and 3650))`.execute(db)

  await db.schema
    .createTable('work_orders')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('site_id', 'uuid', (c) => c.notNull())
    .addColumn('number', 'integer', (c) => c.notNull().check(sql`number > 0`))
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('instructions', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('open'))
    .addColumn('band', 'smallint')
    .addColumn('due_on', 'date')
    .addColumn('state_reason', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('deferred_until', 'date')
    .addColumn('cause_found', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('parts', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('work_done', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('time_spent_minutes', 'integer')
    .addColumn('created_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('closed_at', 'timestamptz')
    .addColumn('archived_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('work_orders_state_valid', sql`state in ('open', 'planned', 'in_repair', 'awaiting_verification', 'closed', 'deferred', 'cancelled')`)
    .addCheckConstraint('work_orders_band_range', sql`band is null or band between 1 and 4`)
    .addCheckConstraint('work_orders_time_spent_range', sql`time_spent_minutes is null or time_spent_minutes between 0 and 100000`)
    .addCheckConstraint('work_orders_deferred_has_date', sql`state <> 'deferred' or deferred_until is not null`)
    .addForeignKeyConstraint('work_orders_site_fkey', ['organisation_id', 'site_id'], 'sites', ['organisation_id', 'id'])
    .addUniqueConstraint('work_orders_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('work_orders_org_number_key', ['organisation_id', 'number'])
    .execute()
  await db.schema.createIndex('work_orders_organisation_state_idx').on('work_orders').columns(['organisation_id', 'state', 'due_on']).execute()
  await db.schema.createIndex('work_orders_organisation_site_idx').on('work_orders').columns(['organisation_id', 'site_id']).execute()

  await db.schema
    .createTable('work_order_findings')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull())
    .addColumn('work_order_id', 'uuid', (c) => c.notNull())
    .addColumn('finding_id', 'uuid', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addForeignKeyConstraint('work_order_findings_work_order_fkey', ['organisation_id', 'work_order_id'], 'work_orders', ['organisation_id', 'id'])
    .addForeignKeyConstraint('work_order_findings_finding_fkey', ['organisation_id', 'finding_id'], 'findings', ['organisation_id', 'id'])
    .addUniqueConstraint('work_order_findings_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('work_order_findings_pair_key', ['work_order_id', 'finding_id'])
    .execute()
  await db.schema.createIndex('work_order_findings_organisation_wo_idx').on('work_order_findings').columns(['organisation_id', 'work_order_id']).execute()
  await db.schema.createIndex('work_order_findings_organisation_finding_idx').on('work_order_findings').columns(['organisation_id', 'finding_id']).execute()

  await db.schema
    .createTable('work_order_assignees')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull())
    .addColumn('work_order_id', 'uuid', (c) => c.notNull())
    .addColumn('user_id', 'uuid', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('work_order_assignees_pkey', ['organisation_id', 'work_order_id', 'user_id'])
    .addForeignKeyConstraint('work_order_assignees_work_order_fkey', ['organisation_id', 'work_order_id'], 'work_orders', ['organisation_id', 'id'])
    .addForeignKeyConstraint('work_order_assignees_member_fkey', ['organisation_id', 'user_id'], 'memberships', ['organisation_id', 'user_id'])
    .execute()
  await db.schema.createIndex('work_order_assignees_organisation_user_idx').on('work_order_assignees').columns(['organisation_id', 'user_id']).execute()

  let verifications = db.schema
    .createTable('verifications')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('work_order_id', 'uuid', (c) => c.notNull())
    .addColumn('finding_id', 'uuid', (c) => c.notNull())
    .addColumn('site_id', 'uuid', (c) => c.notNull())
    // Chosen thermographer; null = whoever next surveys the site picks it up.
    .addColumn('thermographer_id', 'uuid')
    .addColumn('survey_id', 'uuid')
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('waiting'))
    .addColumn('warnings', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('recorded_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('recorded_at', 'timestamptz')
  for (const [name, type] of READING_INPUTS_AND_RESULTS) verifications = verifications.addColumn(name, type)
  await verifications
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // withdrawn: the work order left "awaiting verification" (another reading failed, or it was cancelled).
    .addCheckConstraint('verifications_state_valid', sql`state in ('waiting', 'passed', 'failed', 'withdrawn')`)
    .addCheckConstraint('verifications_reading_when_recorded', sql`(state in ('passed', 'failed')) = (recorded_at is not null and apparent_c is not null and object_c is not null)`)
    .addCheckConstraint('verifications_band_range', sql`band is null or band between 1 and 4`)
    .addCheckConstraint('verifications_emissivity_range', sql`emissivity is null or (emissivity > 0 and emissivity <= 1)`)
    .addCheckConstraint('verifications_reflected_method_valid', sql`reflected_method is null or reflected_method in ('reflector', 'direct', 'estimated')`)
    .addCheckConstraint('verifications_window_pair', sql`(window_transmittance is null) = (window_c is null)`)
    .addForeignKeyConstraint('verifications_work_order_fkey', ['organisation_id', 'work_order_id'], 'work_orders', ['organisation_id', 'id'])
    .addForeignKeyConstraint('verifications_finding_fkey', ['organisation_id', 'finding_id'], 'findings', ['organisation_id', 'id'])
    .addForeignKeyConstraint('verifications_site_fkey', ['organisation_id', 'site_id'], 'sites', ['organisation_id', 'id'])
    .addForeignKeyConstraint('verifications_thermographer_fkey', ['organisation_id', 'thermographer_id'], 'memberships', ['organisation_id', 'user_id'])
    .addForeignKeyConstraint('verifications_survey_fkey', ['organisation_id', 'survey_id'], 'surveys', ['organisation_id', 'id'])
    .addUniqueConstraint('verifications_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('verifications_organisation_state_idx').on('verifications').columns(['organisation_id', 'state', 'site_id']).execute()
  await db.schema.createIndex('verifications_organisation_wo_idx').on('verifications').columns(['organisation_id', 'work_order_id']).execute()

  // The timeline: who did what, when and why, to a finding, work order or verification. Append-only.
  await db.schema
    .createTable('record_events')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('subject_kind', 'text', (c) => c.notNull())
    .addColumn('subject_id', 'uuid', (c) => c.notNull())
    // The work order the event belongs to, when there is one (so a work order's timeline is one index read).
    .addColumn('work_order_id', 'uuid')
    .addColumn('actor_id', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('reason', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('details', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('record_events_subject_kind_valid', sql`subject_kind in ('finding', 'work_order', 'verification')`)
    .addForeignKeyConstraint('record_events_work_order_fkey', ['organisation_id', 'work_order_id'], 'work_orders', ['organisation_id', 'id'])
    .addUniqueConstraint('record_events_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('record_events_organisation_subject_idx').on('record_events').columns(['organisation_id', 'subject_kind', 'subject_id', 'created_at']).execute()
  await db.schema.createIndex('record_events_organisation_wo_idx').on('record_events').columns(['organisation_id', 'work_order_id', 'created_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['record_events', 'verifications', 'work_order_assignees', 'work_order_findings', 'work_orders']) {
    await db.schema.dropTable(t).ifExists().execute()
  }
  await sql`alter table organisations drop constraint if exists organisations_repair_days_range`.execute(db)
  for (const c of ['work_order_counter', 'repair_days_band4', 'repair_days_band3', 'repair_days_band2', 'repair_days_band1']) {
    await db.schema.alterTable('organisations').dropColumn(c).execute()
  }
}
