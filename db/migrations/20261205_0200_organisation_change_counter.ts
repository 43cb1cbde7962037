import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
//
// organisations.change_seq goes up by one in every committed transaction that changed the organisation's field data
// (its sites, assets, surveys, checks, findings, routes, work orders, verifications, or the organisation's own
// settings). Answers computed from that data can then be kept and reused for as long as the number has not moved
// (server/utils/org-cache.ts): every request reads it with its membership anyway, so a reused answer is never older
// than the last committed change, on any app instance.
//
// The bump runs at commit (a deferred constraint trigger), once per organisation and transaction, so the row lock it
// takes is held only for the commit itself; a rolled-back transaction bumps nothing.
const WATCHED = [
  'sites', 'assets', 'surveys', 'survey_sites', 'checks', 'findings', 'routes', 'route_stops',
  'work_orders', 'work_order_findings', 'verifications',
]

export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table organisations add column change_seq bigint not null default 0`.execute(db)

  await sql`create function organisations_bump_change_seq() returns trigger language plpgsql as $fn$
    declare
      org uuid := case tg_op when 'DELETE' then old.organisation_id else new.organisation_id end;
      done text := coalesce(current_setting('greybody.change_seq_bumped', true), '');
    begin
      if strpos(done, org::text) = 0 then
        update organisations set change_seq = change_seq + 1 where id = org;
        perform set_config('greybody.change_seq_bumped', done || org::text || ' ', true);
      end if;
      return null;
    end
  $fn$`.execute(db)
  for (const table of WATCHED) {
    await sql`create constraint trigger ${sql.id(`${table}_change_seq`)} after insert or update or delete on ${sql.table(table)}
      deferrable initially deferred for each row execute function organisations_bump_change_seq()`.execute(db)
  }

  // The organisation's own settings (programme intervals, time zone, …): any other change to its row counts too.
  await sql`create function organisations_count_own_change() returns trigger language plpgsql as $fn$
    begin
      if new.change_seq = old.change_seq and row(new.*) is distinct from row(old.*) then
        new.change_seq := old.change_seq + 1;
      end if;
      return new;
    end
  $fn$`.execute(db)
  await sql`create trigger organisations_own_change_seq before update on organisations
    for each row execute function organisations_count_own_change()`.execute(db)

  // A person's name is shown on findings they reviewed: a new name counts in each of their organisations.
  await sql`create function users_bump_change_seq() returns trigger language plpgsql as $fn$
    begin
      update organisations set change_seq = change_seq + 1
        where id in (select organisation_id from memberships where user_id = new.id);
      return null;
    end
  $fn$`.execute(db)
  await sql`create trigger users_change_seq after update of name on users
    for each row when (old.name is distinct from new.name) execute function users_bump_change_seq()`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop trigger if exists users_change_seq on users`.execute(db)
  await sql`drop function if exists users_bump_change_seq()`.execute(db)
  await sql`drop trigger if exists organisations_own_change_seq on organisations`.execute(db)
  await sql`drop function if exists organisations_count_own_change()`.execute(db)
  for (const table of WATCHED) await sql`drop trigger if exists ${sql.id(`${table}_change_seq`)} on ${sql.table(table)}`.execute(db)
  await sql`drop function if exists organisations_bump_change_seq()`.execute(db)
  await sql`alter table organisations drop column change_seq`.execute(db)
}
