import { sql, type Kysely } from 'kysely'
import { addTenantWall } from '../tenant-wall'

// The audit log: security-relevant events of each organisation (audit_events, behind the tenant wall), and each
// person's own sign-ins and password changes (account_events, per person, not per organisation). Both are
// append-only: a trigger refuses UPDATE, and DELETE except when the owning organisation (or person) is itself gone.
// Frozen in time: this migration never imports application code (db/tenant-wall.ts is frozen like a migration).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    create function audit_append_only() returns trigger language plpgsql as $$
    begin
      if tg_op = 'DELETE' then
        -- Rows go only with their owner (the cascade from deleting an organisation or person), never on their own.
        -- Nested IFs: each table's fields are read only for that table.
        if tg_table_name = 'audit_events' then
          if not exists (select 1 from organisations where id = old.organisation_id) then
            return old;
          end if;
        elsif old.user_id is not null then
          if not exists (select 1 from users where id = old.user_id) then
            return old;
          end if;
        end if;
      end if;
      raise exception 'The audit log is append-only: % on % is refused.', tg_op, tg_table_name
        using errcode = 'insufficient_privilege';
    end
    $$`.execute(db)

  await db.schema
    .createTable('audit_events')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    // clock_timestamp(): several entries of one transaction keep their order.
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`clock_timestamp()`))
    // Null actor: the system or the payment provider (actor_label says which).
    .addColumn('actor_id', 'uuid', (c) => c.references('users.id'))
    // Name and e-mail as they were at the time (people rename themselves; the log keeps what it saw).
    .addColumn('actor_label', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('actor_token_id', 'uuid')
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('target_kind', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('target_id', 'text')
    .addColumn('target_label', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('details', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('ip', 'text')
    .addColumn('user_agent', 'text')
    .addCheckConstraint('audit_events_action_shape', sql`action ~ '^[a-z_]+\\.[a-z_]+$'`)
    .addCheckConstraint('audit_events_text_lengths', sql`length(actor_label) <= 400 and length(target_label) <= 400 and length(coalesce(ip, '')) <= 100 and length(coalesce(user_agent, '')) <= 400 and length(coalesce(target_id, '')) <= 200`)
    .addForeignKeyConstraint('audit_events_token_fkey', ['organisation_id', 'actor_token_id'], 'api_tokens', ['organisation_id', 'id'])
    .addUniqueConstraint('audit_events_org_id_key', ['organisation_id', 'id'])
    .execute()
  await sql`create index audit_events_organisation_at_idx on audit_events (organisation_id, at desc, id desc)`.execute(db)
  await sql`create index audit_events_organisation_action_idx on audit_events (organisation_id, action, at desc)`.execute(db)
  await sql`create index audit_events_organisation_actor_idx on audit_events (organisation_id, actor_id, at desc)`.execute(db)
  await sql`create index audit_events_organisation_target_idx on audit_events (organisation_id, target_kind, target_id, at desc)`.execute(db)
  await sql`create trigger audit_events_append_only before update or delete on audit_events for each row execute function audit_append_only()`.execute(db)

  // The tenant wall (db/tenant-wall.ts): a connection sees and writes only the organisation it was set for.
  await addTenantWall(db, 'audit_events')

  // A person's own sign-ins, sign-outs and password changes (shown on their account page). user_id is null for a
  // refused sign-in with an address that has no account.
  await db.schema
    .createTable('account_events')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('user_id', 'uuid', (c) => c.references('users.id').onDelete('cascade'))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('ip', 'text')
    .addColumn('user_agent', 'text')
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`clock_timestamp()`))
    .addCheckConstraint('account_events_action_valid', sql`action in ('account.signed_in', 'account.sign_in_failed', 'account.signed_out', 'account.password_changed', 'account.password_reset')`)
    .addCheckConstraint('account_events_text_lengths', sql`length(email) <= 254 and length(coalesce(ip, '')) <= 100 and length(coalesce(user_agent, '')) <= 400`)
    .execute()
  await sql`create index account_events_user_at_idx on account_events (user_id, at desc, id desc)`.execute(db)
  await sql`create trigger account_events_append_only before update or delete on account_events for each row execute function audit_append_only()`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('account_events').ifExists().execute()
  await db.schema.dropTable('audit_events').ifExists().execute()
  await sql`drop function if exists audit_append_only()`.execute(db)
}
