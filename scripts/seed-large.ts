// Loads one large invented organisation — 5 000 sites and 100 000 assets, then (second stage,
// scripts/seed-large-fieldwork.ts) four rounds of surveys with ~400 000 checks, 200 000 findings and 20 000 work
// orders — for the list and load benchmarks and for trying the product at utility scale. Separate from the demo seed
// and never part of the tests.
//
//   set -a; . .data/dev/services.env; set +a
//   node --import tsx scripts/seed-large.ts            # adds it unless it is there (or only its fieldwork, if missing)
//   node --import tsx scripts/seed-large.ts --replace  # removes it first and loads it again
//
// Meant for a development database: the assets, checks, findings and timeline tables are locked while their
// indexes are rebuilt (the whole load takes a few minutes on two cores; each step prints its time).
// Rows are generated inside PostgreSQL (INSERT … SELECT over generate_series): two statements instead of
// 105 000 round trips. Values come from hashing the row number, so every run gives the same data.
import bcrypt from 'bcryptjs'
import { sql } from 'kysely'
import { connect } from '../db/migrator'
import { ASSET_CLASSES } from '../shared/register'
import { seedLargeFieldwork } from './seed-large-fieldwork'

const LARGE_ORG = { slug: 'greyfield-large', name: 'Greyfield Grid (large, invented)' }
const LARGE_OWNER = { email: 'large-owner@greyfield.example', name: 'Greyfield Owner', password: 'greybody-large-2026' }
const SITES = 5000
const ASSETS_PER_SITE = 20

// Invented place names: no real network is described.
const PLACES = ['Ashby Moor', 'Brindle', 'Carrow Fell', 'Dunmere', 'Elsworth', 'Farleigh', 'Gorsedale', 'Hatherwick', 'Ilston', 'Jessop Cross',
  'Kelderby', 'Langmoor', 'Marrowby', 'Netherfold', 'Oakhurst', 'Pellow', 'Quarrendon', 'Redmire', 'Saltcote', 'Thornaby Vale',
  'Upperleigh', 'Vellacott', 'Wrexby', 'Yarrowfield', 'Abbotsmere', 'Blackwater Rise', 'Cinderford Edge', 'Dalby Wold', 'Ebberston', 'Foxholes']
const SUFFIXES = ['Primary', 'Grid', 'Switching Station', 'Bulk Supply', 'Feeder Yard', 'Tap', 'Pumping Station', 'Works']
const KINDS = ['substation', 'substation', 'substation', 'substation', 'substation', 'substation', 'switchyard', 'plant_room', 'plant_room', 'line_section']
const VOLTS = [11, 11, 33, 33, 66, 132, 132, 275, 400, 0.4]
const MAKERS = ['Hallam Electric', 'Northgate Switchgear', 'Pennine Apparatus', 'Corvid Power', 'Tamar Equipment', 'Wensley & Baird', 'Kestrel Controls', 'Orme Transformers']
const PREFIX: Record<string, string> = {
  transformer: 'TX', breaker: 'CB', disconnect: 'DS', bus: 'BUS', cable_termination: 'CT', instrument_transformer: 'IT',
  surge_arrester: 'SA', recloser: 'RC', capacitor_bank: 'CAP', switchgear: 'SWG', mcc: 'MCC', panelboard: 'PB',
  line_connector: 'LC', insulator: 'INS',
}

const url = process.env.NUXT_DATABASE_URL
if (!url) {
  console.error('NUXT_DATABASE_URL is not set (source .data/<profile>/services.env first).')
  process.exit(1)
}
const replace = process.argv.includes('--replace')
const db = connect(url, 1)
const started = Date.now()
try {
  const present = await db.selectFrom('organisations').select('id').where('slug', '=', LARGE_ORG.slug).executeTakeFirst()
  const hasFieldwork = present
    ? !!(await db.selectFrom('surveys').select('id').where('organisation_id', '=', present.id).limit(1).executeTakeFirst())
    : false
  const passwordHash = () => bcrypt.hash(LARGE_OWNER.password, 10)
  const say = (line: string) => console.log(line)
  if (present && !replace && hasFieldwork) {
    console.log(`${LARGE_ORG.name} is already loaded (use --replace to load it again).`)
  } else if (present && !replace) {
    // Loaded by an earlier version of this script (register only): add the second stage.
    console.log(`${LARGE_ORG.name} has its register but no fieldwork: adding it.`)
    await db.transaction().execute(async (trx) => {
      await sql`set constraints all immediate`.execute(trx) // see below: indexes are rebuilt inside the transaction
      const owner = await trx.selectFrom('users').select('id').where(sql`lower(email)`, '=', LARGE_OWNER.email).executeTakeFirstOrThrow()
      await seedLargeFieldwork(trx, { orgId: present.id, ownerId: owner.id, passwordHash: await passwordHash(), say })
    })
  } else {
    await db.transaction().execute(async (trx) => {
      // The organisation's change counter is bumped by deferred triggers, and PostgreSQL refuses index changes on a
      // table with deferred events pending: here they fire at each statement instead (this load drops and rebuilds
      // indexes inside its transaction).
      await sql`set constraints all immediate`.execute(trx)
      if (present) {
        // Children first: these tables reference the organisation without cascading through each other.
        say('Removing the earlier copy…')
        for (const table of ['record_events', 'verifications', 'work_order_assignees', 'work_order_findings', 'work_orders', 'findings', 'checks',
          'survey_sites', 'surveys', 'instruments', 'register_import_rows', 'register_imports', 'assets'] as const) {
          await sql`delete from ${sql.table(table)} where organisation_id = ${present.id}`.execute(trx)
        }
        await sql`delete from organisations where id = ${present.id}`.execute(trx)
      }
      const org = await trx.insertInto('organisations').values({ slug: LARGE_ORG.slug, name: LARGE_ORG.name, time_zone: 'Europe/London' })
        .returning('id').executeTakeFirstOrThrow()
      let user = await trx.selectFrom('users').select('id').where(sql`lower(email)`, '=', LARGE_OWNER.email).executeTakeFirst()
      user ??= await trx.insertInto('users')
        .values({ email: LARGE_OWNER.email, name: LARGE_OWNER.name, password_hash: await passwordHash(), time_zone: 'Europe/London' })
        .returning('id').executeTakeFirstOrThrow()
      await trx.insertInto('memberships').values({ organisation_id: org.id, user_id: user.id, role: 'owner', removed_at: null }).execute()

      // h(n, salt): a non-negative integer hash of the row number, so consecutive rows spread over the lists the
      // same way on every run without a random generator. A temporary function, gone when the session ends.
      await sql`create function pg_temp.h(n bigint, salt int) returns int language sql immutable
        as 'select hashint8(n * 1000 + salt) & 2147483647'`.execute(trx)
      await sql`insert into sites (organisation_id, code, name, kind, latitude, longitude, voltage_kv, access_notes, safety_notes, safety_flags)
        select ${org.id}::uuid,
          'GF-' || lpad(i::text, 5, '0'),
          (${PLACES}::text[])[1 + pg_temp.h(i, 1) % ${PLACES.length}] || ' ' || (${SUFFIXES}::text[])[1 + pg_temp.h(i, 2) % ${SUFFIXES.length}] || ' ' || i,
          (${KINDS}::text[])[1 + pg_temp.h(i, 3) % ${KINDS.length}],
          50.0 + pg_temp.h(i, 4) % 60000 / 10000.0,
          -5.5 + pg_temp.h(i, 5) % 75000 / 10000.0,
          (${VOLTS}::numeric[])[1 + pg_temp.h(i, 6) % ${VOLTS.length}],
          case when i % 3 = 0 then 'Key safe at the main gate; call control before entry.' else '' end,
          case when i % 5 = 0 then 'Switching permit required. Work in pairs.' else '' end,
          case when i % 5 = 0 then '{permit_required,work_in_pairs}'::text[] when i % 7 = 0 then '{ir_windows}'::text[] else '{}'::text[] end
        from generate_series(1, ${SITES}) as i`.execute(trx)

      // Bulk-load practice: build the secondary indexes once after the insert instead of row by row during it.
      // Their definitions are read from the catalogue, so the migrations stay the one place that defines them.
      const { rows: indexes } = await sql<{ name: string; def: string }>`select i.indexname as name, i.indexdef as def
        from pg_indexes i where i.schemaname = 'public' and i.tablename = 'assets'
          and not exists (select 1 from pg_constraint c where c.conname = i.indexname)`.execute(trx)
      for (const ix of indexes) await sql`drop index ${sql.id(ix.name)}`.execute(trx)
      await sql`insert into assets (organisation_id, site_id, label, asset_class, manufacturer, model, voltage_kv, rated_current_a,
          criticality, condition, components, interval_months, archived_at)
        select ${org.id}::uuid, s.id,
          (${ASSET_CLASSES.map((c) => PREFIX[c]!)}::text[])[1 + pg_temp.h(s.n * 32 + j, 7) % ${ASSET_CLASSES.length}] || '-' || lpad(j::text, 2, '0'),
          (${[...ASSET_CLASSES]}::text[])[1 + pg_temp.h(s.n * 32 + j, 7) % ${ASSET_CLASSES.length}],
          (${MAKERS}::text[])[1 + pg_temp.h(s.n * 32 + j, 8) % ${MAKERS.length}],
          chr(65 + pg_temp.h(s.n * 32 + j, 9) % 26) || chr(65 + pg_temp.h(s.n * 32 + j, 10) % 26) || '-' || (100 + pg_temp.h(s.n * 32 + j, 11) % 900),
          s.voltage_kv,
          (200 + pg_temp.h(s.n * 32 + j, 12) % 40 * 50)::numeric,
          1 + pg_temp.h(s.n * 32 + j, 13) % 5,
          case when pg_temp.h(s.n * 32 + j, 14) % 10 < 6 then 1 when pg_temp.h(s.n * 32 + j, 14) % 10 < 9 then 2 else 3 end,
          case when j % 4 = 0 then '{A,B,C,N}'::text[] else '{A,B,C}'::text[] end,
          case when pg_temp.h(s.n * 32 + j, 15) % 25 = 0 then 6 else null end,
          case when pg_temp.h(s.n * 32 + j, 16) % 100 = 0 then now() else null end
        from (select id, voltage_kv, row_number() over (order by code) as n from sites where organisation_id = ${org.id}) s
        cross join generate_series(1, ${ASSETS_PER_SITE}) as j`.execute(trx)
      for (const ix of indexes) await sql.raw(ix.def).execute(trx)
      say(`Register: ${SITES.toLocaleString('en-GB')} sites, ${(SITES * ASSETS_PER_SITE).toLocaleString('en-GB')} assets (${((Date.now() - started) / 1000).toFixed(1)} s). Fieldwork:`)
      await seedLargeFieldwork(trx, { orgId: org.id, ownerId: user.id, passwordHash: await passwordHash(), say })
    })
  }
  if (!(present && !replace && hasFieldwork)) {
    for (const t of ['sites', 'assets', 'surveys', 'survey_sites', 'checks', 'findings', 'work_orders', 'work_order_findings', 'work_order_assignees',
      // Vacuumed as autovacuum would soon do: statistics for the planner, and the visibility map that lets the
      // list's count read its index alone (otherwise each row is looked up in the table until autovacuum has run).
      'verifications', 'record_events']) await sql`vacuum (analyze) ${sql.table(t)}`.execute(db)
    const org = await db.selectFrom('organisations').select('id').where('slug', '=', LARGE_ORG.slug).executeTakeFirstOrThrow()
    const count = async (t: string) =>
      Number((await sql<{ n: number }>`select count(*) as n from ${sql.table(t)} where organisation_id = ${org.id}`.execute(db)).rows[0]!.n).toLocaleString('en-GB')
    console.log(`Loaded ${LARGE_ORG.name} in ${((Date.now() - started) / 1000).toFixed(1)} s: ${await count('sites')} sites, ${await count('assets')} assets, `
      + `${await count('surveys')} surveys, ${await count('checks')} checks, ${await count('findings')} findings, ${await count('work_orders')} work orders, `
      + `${await count('record_events')} timeline entries.`)
    console.log(`Sign in as ${LARGE_OWNER.email} / ${LARGE_OWNER.password} (other members: large-<role>-NN@greyfield.example, same password), then open /orgs/${LARGE_ORG.slug}/findings.`)
  }
} finally {
  await db.destroy()
}
