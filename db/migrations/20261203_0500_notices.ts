import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // In-app notices; one per person and dedupe key, so a job that runs twice adds nothing the second time.
  await db.schema
    .createTable('notices')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('body', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('link', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('dedupe_key', 'text', (c) => c.notNull())
    .addColumn('read_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('notices_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('notices_recipient_dedupe_key', ['organisation_id', 'user_id', 'dedupe_key'])
    .execute()
  await db.schema.createIndex('notices_recipient_idx').on('notices').columns(['organisation_id', 'user_id', 'created_at']).execute()
  // Unread counts for the header bell stay cheap.
  await db.schema.createIndex('notices_unread_idx').on('notices').columns(['organisation_id', 'user_id']).where(sql.ref('read_at'), 'is', null).execute()

  // Whether a person gets a kind of notice by e-mail; no row means yes.
  await db.schema
    .createTable('notice_preferences')
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('user_id', 'uuid', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('by_email', 'boolean', (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('notice_preferences_pkey', ['organisation_id', 'user_id', 'kind'])
    .execute()

  // E-mails waiting to go out: written in the same transaction as what caused them, sent by a worker.
  await db.schema
    .createTable('outbox')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('user_id', 'uuid', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('kind', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('to_address', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('text', 'text', (c) => c.notNull())
    .addColumn('html', 'text')
    .addColumn('headers', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('dedupe_key', 'text', (c) => c.notNull())
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('waiting'))
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('next_attempt_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('last_error', 'text')
    .addColumn('sent_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('outbox_state_known', sql`state in ('waiting', 'sending', 'sent', 'failed')`)
    .addUniqueConstraint('outbox_org_id_key', ['organisation_id', 'id'])
    .addUniqueConstraint('outbox_recipient_dedupe_key', ['organisation_id', 'to_address', 'dedupe_key'])
    .execute()
  await db.schema.createIndex('outbox_organisation_state_idx').on('outbox').columns(['organisation_id', 'state', 'created_at']).execute()
  // The worker's scan: only rows that may still go out.
  await db.schema.createIndex('outbox_due_idx').on('outbox').columns(['next_attempt_at'])
    .where(sql.ref('state'), 'in', sql`('waiting', 'sending')`).execute()

  // One row per scheduled job and time slot: the instance whose insert succeeds runs it, the others skip.
  await db.schema
    .createTable('job_runs')
    .addColumn('job', 'text', (c) => c.notNull())
    .addColumn('slot', 'text', (c) => c.notNull())
    .addColumn('claimed_by', 'text', (c) => c.notNull())
    .addColumn('claimed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('finished_at', 'timestamptz')
    .addColumn('summary', 'jsonb')
    .addPrimaryKeyConstraint('job_runs_pkey', ['job', 'slot'])
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['job_runs', 'outbox', 'notice_preferences', 'notices']) await db.schema.dropTable(t).ifExists().execute()
}
