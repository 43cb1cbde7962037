import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code.
// The findings list at utility scale (200 000 findings; scripts/bench/load.bench.ts). Its page walks surveys newest
// first and fetches each survey's findings; its count stops after a thousand rows.
export async function up(db: Kysely<any>): Promise<void> {
  // A survey's checks with their ids and assets, read without touching the table (the list's newest-first walk).
  await sql`create index if not exists checks_organisation_survey_idx on checks (organisation_id, survey_id) include (id, asset_id)`.execute(db)
  // Findings by the band lists filter on (the reviewed band where there is one, else the computed band) and check:
  // not archived, and open (not closed, not archived).
  await sql`create index if not exists findings_list_band_idx on findings (organisation_id, (coalesce(reviewed_band, band)), check_id)
    where archived_at is null`.execute(db)
  await sql`create index if not exists findings_list_open_band_idx on findings (organisation_id, (coalesce(reviewed_band, band)), check_id)
    where closed_at is null and archived_at is null`.execute(db)
  // Statistics on that expression: without them PostgreSQL takes a band to match 0.5 % of findings (its default)
  // instead of ~15 %, and plans to read every match before sorting rather than walking the newest surveys.
  await sql`create statistics if not exists findings_effective_band_stats on (coalesce(reviewed_band, band)) from findings`.execute(db)
  // A finding's verifications (the dashboard's time to repair groups them by finding). The foreign key from
  // verifications to findings had no index behind it, so removing findings (the large seed's --replace) checked each
  // one against the whole verifications table.
  await sql`create index if not exists verifications_organisation_finding_idx on verifications (organisation_id, finding_id)`.execute(db)
  await sql`analyze findings`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists verifications_organisation_finding_idx`.execute(db)
  await sql`drop statistics if exists findings_effective_band_stats`.execute(db)
  await sql`drop index if exists findings_list_open_band_idx`.execute(db)
  await sql`drop index if exists findings_list_band_idx`.execute(db)
  await sql`drop index if exists checks_organisation_survey_idx`.execute(db)
}
