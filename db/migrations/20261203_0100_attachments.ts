import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
// Images and other files attached to a finding or a work order. The bytes live in object storage under the
// organisation's prefix; this row is the record of them and is never deleted (archived_at instead).
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('attachments')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    // The subject is polymorphic (finding or work order), so the service checks it under the organisation condition.
    .addColumn('subject_kind', 'text', (c) => c.notNull())
    .addColumn('subject_id', 'uuid', (c) => c.notNull())
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('file_name', 'text', (c) => c.notNull())
    .addColumn('content_type', 'text', (c) => c.notNull())
    .addColumn('size_bytes', 'bigint', (c) => c.notNull())
    .addColumn('object_key', 'text', (c) => c.notNull())
    .addColumn('thumbnail_key', 'text')
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('pending'))
    .addColumn('refused_reason', 'text')
    .addColumn('uploaded_by', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('stored_at', 'timestamptz')
    .addColumn('archived_at', 'timestamptz')
    .addCheckConstraint('attachments_subject_kind_valid', sql`subject_kind in ('finding', 'work_order')`)
    .addCheckConstraint('attachments_kind_valid', sql`kind in ('infrared', 'visible', 'repair')`)
    .addCheckConstraint('attachments_state_valid', sql`state in ('pending', 'stored', 'refused')`)
    .addCheckConstraint('attachments_content_type_valid', sql`content_type in ('image/jpeg', 'image/png')`)
    .addCheckConstraint('attachments_size_valid', sql`size_bytes > 0 and size_bytes <= 26214400`)
    .addCheckConstraint('attachments_file_name_valid', sql`length(file_name) between 1 and 120 and file_name !~ '[/\\\\[:cntrl:]]'`)
    // Keys always sit under the organisation's prefix, so one tenant's record can never point at another's object.
    .addCheckConstraint('attachments_key_in_prefix', sql`object_key like 'orgs/' || organisation_id::text || '/%' and (thumbnail_key is null or thumbnail_key like 'orgs/' || organisation_id::text || '/%')`)
    .addCheckConstraint('attachments_refused_has_reason', sql`(state = 'refused') = (refused_reason is not null)`)
    .addCheckConstraint('attachments_stored_has_time', sql`(state = 'stored') = (stored_at is not null)`)
    .addUniqueConstraint('attachments_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('attachments_organisation_subject_idx').on('attachments')
    .columns(['organisation_id', 'subject_kind', 'subject_id', 'created_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('attachments').ifExists().execute()
}
