import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
export async function up(db: Kysely<any>): Promise<void> {
  // The imager a verification reading was taken with (its band and accuracy go into the engine, like a survey's).
  await db.schema.alterTable('verifications').addColumn('instrument_id', 'uuid').execute()
  await sql`alter table verifications add constraint verifications_instrument_fkey foreign key (organisation_id, instrument_id) references instruments (organisation_id, id)`.execute(db)
  await sql`alter table verifications add constraint verifications_instrument_when_recorded check (state not in ('passed', 'failed') or instrument_id is not null)`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table verifications drop constraint if exists verifications_instrument_when_recorded`.execute(db)
  await sql`alter table verifications drop constraint if exists verifications_instrument_fkey`.execute(db)
  await db.schema.alterTable('verifications').dropColumn('instrument_id').execute()
}
