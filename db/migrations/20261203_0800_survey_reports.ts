import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // A thermographer's qualification as the organisation records it (e.g. "ISO 18436-7 category II, cert. 1234"),
  // printed on the survey report's cover. Per membership: one person may hold it on record with several organisations.
  await db.schema.alterTable('memberships').addColumn('qualification', 'text', (c) => c.notNull().defaultTo('')).execute()
  await sql`alter table memberships add constraint memberships_qualification_length check (length(qualification) <= 300)`.execute(db)

  // Survey reports: generated in the background by a worker in the app process, stored in object storage.
  await db.schema
    .createTable('survey_reports')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('survey_id', 'uuid', (c) => c.notNull())
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('queued'))
    .addColumn('progress', 'smallint', (c) => c.notNull().defaultTo(0))
    .addColumn('include_images', 'boolean', (c) => c.notNull().defaultTo(true))
    .addColumn('object_key', 'text')
    .addColumn('size_bytes', 'bigint')
    .addColumn('page_count', 'integer')
    .addColumn('finding_count', 'integer')
    .addColumn('image_count', 'integer')
    .addColumn('error', 'text')
    .addColumn('attempts', 'smallint', (c) => c.notNull().defaultTo(0))
    .addColumn('requested_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('started_at', 'timestamptz')
    // Set by the running worker as it goes; a running job whose heartbeat stops is taken over by another instance.
    .addColumn('heartbeat_at', 'timestamptz')
    .addColumn('finished_at', 'timestamptz')
    .addCheckConstraint('survey_reports_state_valid', sql`state in ('queued', 'running', 'ready', 'failed')`)
    .addCheckConstraint('survey_reports_progress_range', sql`progress between 0 and 100`)
    .addCheckConstraint('survey_reports_ready_has_object', sql`state <> 'ready' or (object_key is not null and size_bytes is not null)`)
    .addForeignKeyConstraint('survey_reports_survey_fkey', ['organisation_id', 'survey_id'], 'surveys', ['organisation_id', 'id'], (c) => c.onDelete('cascade'))
    .addUniqueConstraint('survey_reports_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('survey_reports_organisation_survey_idx').on('survey_reports').columns(['organisation_id', 'survey_id', 'created_at']).execute()
  // The worker's queue: only unfinished jobs, oldest first, across organisations.
  await sql`create index survey_reports_pending_idx on survey_reports (created_at) where state in ('queued', 'running')`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('survey_reports').ifExists().execute()
  await sql`alter table memberships drop constraint if exists memberships_qualification_length`.execute(db)
  await db.schema.alterTable('memberships').dropColumn('qualification').execute()
}
