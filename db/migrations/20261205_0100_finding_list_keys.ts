import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
//
// The findings list at utility scale (200 000 findings, 32 people at once; scripts/bench/load.bench.ts). Its filters
// and its order live on three tables (the finding's band and state, its survey's date and state, its asset's site),
// so every page and every "more than 1,000" count joined findings, checks and surveys row by row. Here each finding
// carries copies of the keys the list filters and sorts on, kept by PostgreSQL itself (triggers, whichever code path
// writes), so a page is one walk down one index and a count reads the index alone.
//
//   findings.survey_id, asset_id, site_id        from its check and the check's asset (set on insert)
//   findings.survey_planned_for, survey_state,   from its survey, rewritten when the survey's date, state or archive
//   findings.survey_archived                     changes
//   findings.effective_band                      the reviewed band where there is one, else the computed band
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table findings
    add column survey_id uuid,
    add column asset_id uuid,
    add column site_id uuid,
    add column survey_planned_for date,
    add column survey_state text,
    add column survey_archived boolean,
    add column effective_band smallint generated always as (coalesce(reviewed_band, band)) stored`.execute(db)

  await sql`update findings f set survey_id = c.survey_id, asset_id = c.asset_id, site_id = a.site_id,
      survey_planned_for = s.planned_for, survey_state = s.state, survey_archived = s.archived_at is not null
    from checks c
    join assets a on a.organisation_id = c.organisation_id and a.id = c.asset_id
    join surveys s on s.organisation_id = c.organisation_id and s.id = c.survey_id
    where c.organisation_id = f.organisation_id and c.id = f.check_id`.execute(db)
  await sql`alter table findings
    alter column survey_id set not null, alter column asset_id set not null, alter column site_id set not null,
    alter column survey_planned_for set not null, alter column survey_state set not null,
    alter column survey_archived set not null`.execute(db)

  // A new finding (or one whose check changed) takes its keys from its check, asset and survey. The rows are read
  // FOR SHARE: a survey (or asset) being changed at the same moment is waited for, so the copy is the committed value,
  // and a change that starts after this read waits for this transaction and then rewrites the copy itself.
  await sql`create function findings_copy_list_keys() returns trigger language plpgsql as $fn$
    begin
      select c.survey_id, c.asset_id, a.site_id, s.planned_for, s.state, s.archived_at is not null
        into new.survey_id, new.asset_id, new.site_id, new.survey_planned_for, new.survey_state, new.survey_archived
        from checks c
        join assets a on a.organisation_id = c.organisation_id and a.id = c.asset_id
        join surveys s on s.organisation_id = c.organisation_id and s.id = c.survey_id
        where c.organisation_id = new.organisation_id and c.id = new.check_id
        for share of a, s;
      return new;
    end
  $fn$`.execute(db)
  await sql`create trigger findings_list_keys_on_insert before insert on findings
    for each row execute function findings_copy_list_keys()`.execute(db)
  // Any write naming these columns takes the keys afresh: only this function decides them (the triggers below
  // refresh a survey's, an asset's or a check's findings by naming check_id).
  await sql`create trigger findings_list_keys_on_update before update of check_id, survey_id, asset_id, site_id,
    survey_planned_for, survey_state, survey_archived on findings
    for each row execute function findings_copy_list_keys()`.execute(db)

  // A survey, asset or check whose copied values change makes its findings take their keys afresh (naming check_id
  // fires the trigger above). The trigger's argument is the findings column that points at the changed row.
  await sql`create function findings_refresh_list_keys() returns trigger language plpgsql as $fn$
    begin
      execute format('update findings set check_id = check_id where organisation_id = $1 and %I = $2', tg_argv[0])
        using new.organisation_id, new.id;
      return null;
    end
  $fn$`.execute(db)
  await sql`create trigger surveys_list_keys after update of planned_for, state, archived_at on surveys
    for each row when (old.planned_for is distinct from new.planned_for or old.state is distinct from new.state
      or (old.archived_at is null) <> (new.archived_at is null))
    execute function findings_refresh_list_keys('survey_id')`.execute(db)
  await sql`create trigger assets_list_keys after update of site_id on assets
    for each row when (old.site_id is distinct from new.site_id) execute function findings_refresh_list_keys('asset_id')`.execute(db)
  await sql`create trigger checks_list_keys after update of survey_id, asset_id on checks
    for each row when (old.survey_id is distinct from new.survey_id or old.asset_id is distinct from new.asset_id)
    execute function findings_refresh_list_keys('check_id')`.execute(db)

  // The list's order is newest survey first, then the most severe band, then the order recorded (finding-list-sql.ts).
  // Each index below returns a filter's findings already in that order, so a page stops after its rows; the columns
  // the other filters test are included, so counting reads the index alone.
  const order = sql.raw('survey_planned_for desc, effective_band asc nulls last, created_at, id')
  const bandOrder = sql.raw('effective_band, survey_planned_for desc, created_at, id')
  // Every finding of a live survey: the unfiltered list, and the date filters.
  await sql`create index findings_list_idx on findings (organisation_id, ${order})
    include (closed_at, archived_at, survey_state) where not survey_archived`.execute(db)
  // Open findings (not closed, not archived, survey submitted or reviewed) by band: the dashboard's links.
  await sql`create index findings_list_open_idx on findings (organisation_id, ${bandOrder})
    where not survey_archived and closed_at is null and archived_at is null and survey_state in ('submitted', 'reviewed')`.execute(db)
  // Counted findings (not archived, survey submitted or reviewed) by band.
  await sql`create index findings_list_counted_idx on findings (organisation_id, ${bandOrder})
    include (closed_at) where not survey_archived and archived_at is null and survey_state in ('submitted', 'reviewed')`.execute(db)
  // One site's findings, and one survey's.
  await sql`create index findings_list_site_idx on findings (organisation_id, site_id, ${order})
    include (closed_at, archived_at, survey_state) where not survey_archived`.execute(db)
  await sql`create index findings_survey_idx on findings (organisation_id, survey_id)`.execute(db)
  await sql`create index findings_asset_idx on findings (organisation_id, asset_id)`.execute(db)

  // Superseded by the indexes above (20261204_0300).
  await sql`drop index if exists findings_list_band_idx`.execute(db)
  await sql`drop index if exists findings_list_open_band_idx`.execute(db)
  await sql`analyze findings`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`create index if not exists findings_list_band_idx on findings (organisation_id, (coalesce(reviewed_band, band)), check_id)
    where archived_at is null`.execute(db)
  await sql`create index if not exists findings_list_open_band_idx on findings (organisation_id, (coalesce(reviewed_band, band)), check_id)
    where closed_at is null and archived_at is null`.execute(db)
  for (const i of ['findings_asset_idx', 'findings_survey_idx', 'findings_list_site_idx', 'findings_list_counted_idx', 'findings_list_open_idx', 'findings_list_idx']) {
    await sql`drop index if exists ${sql.id(i)}`.execute(db)
  }
  await sql`drop trigger if exists checks_list_keys on checks`.execute(db)
  await sql`drop trigger if exists assets_list_keys on assets`.execute(db)
  await sql`drop trigger if exists surveys_list_keys on surveys`.execute(db)
  await sql`drop trigger if exists findings_list_keys_on_update on findings`.execute(db)
  await sql`drop trigger if exists findings_list_keys_on_insert on findings`.execute(db)
  for (const f of ['findings_refresh_list_keys', 'findings_copy_list_keys']) {
    await sql`drop function if exists ${sql.id(f)}()`.execute(db)
  }
  await sql`alter table findings drop column effective_band, drop column survey_archived, drop column survey_state,
    drop column survey_planned_for, drop column site_id, drop column asset_id, drop column survey_id`.execute(db)
}
