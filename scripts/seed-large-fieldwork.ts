// Second stage of scripts/seed-large.ts: four rounds of surveys of the large organisation's 100 000 assets — about
// 400 000 checks, exactly 200 000 findings, 20 000 work orders with their assignees, verifications and timeline —
// for the load benchmark (scripts/bench/load.bench.ts) and for trying the programme at utility scale. All invented.
//
// Rows are generated inside PostgreSQL (INSERT … SELECT over numbered temporary tables); values come from hashing
// row numbers, so every run gives the same data. The engine columns of a finding (corrected temperature, rises,
// band, interval, warnings) are never invented: about 1 600 distinct readings (templates × the organisation's 12
// imagers) are run once through the real engine here (findingChainInput + correctionChain, as the server does), and
// each finding takes one of them, chosen by hash within the band wanted — so the stored values are exactly what the
// server would store for those inputs, and a save of an unchanged finding stores them again.
import { sql, type Transaction } from 'kysely'
import { correctionChain } from '../shared/thermal/index'
import { computedColumns, readingColumns } from '../server/services/finding-columns'
import { findingChainInput, type FindingValues } from '../shared/schemas/survey'

const CRITERIA_ID = 'neta-100-18'
/** Rounds of surveys, one every 26 weeks, the last ending yesterday: every asset is checked once per round. */
export const ROUNDS = 4
const ROUND_DAYS = 182
const SITES_PER_SURVEY = 5
const SURVEYS_PER_ROUND = 1000 // 5 000 sites ÷ 5
const FINDINGS = 200_000
const WORK_ORDERS = 20_000
// In the last round, surveys i (0–999) in these ranges are the owner's and still open, so the load benchmark's
// saves (PATCH by the assigned thermographer while in progress or returned) have ~2 000 findings to spread over.
const OWNER_IN_PROGRESS = [936, 968] as const
const OWNER_RETURNED = [968, 984] as const

type Trx = Transaction<any>
type Say = (line: string) => void

// Invented people.
const PEOPLE = {
  manager: ['Imogen Castell', 'Rafe Dunmore'],
  thermographer: ['Ottilie Brand', 'Caspar Leigh', 'Nia Marlowe', 'Tobias Renn', 'Wren Halloway', 'Ezra Quill', 'Mabel Stroud', 'Ansel Ford'],
  crew: ['Dara Finch', 'Hollis Grey', 'Juno Pike', 'Kit Saddler', 'Lorne Abbot', 'Maren Cole', 'Niall Thorne', 'Orla Vance', 'Piers Wick',
    'Rosa Dane', 'Silas Merrow', 'Tamsin Crewe'],
  viewer: ['Vera Lang', 'Wilf Osgood'],
} as const

// Invented imagers: three spectral bands, accuracies and IFOVs that fit the numeric columns exactly.
const INSTRUMENTS = Array.from({ length: 12 }, (_, i) => {
  const kind = [
    { make: 'Kestrel Optics', model: 'KO-640', from: 7.5, to: 14, ifov: 0.68, accK: 2, accPct: 2 },
    { make: 'Harrier Thermal', model: 'HT-320', from: 8, to: 14, ifov: 1.3, accK: 2, accPct: 2 },
    { make: 'Merlin Imaging', model: 'MI-M5', from: 3, to: 5, ifov: 0.9, accK: 1, accPct: 1 },
  ][i % 3]!
  return { ...kind, serial: `GF-IR-${String(1001 + i)}`, calibrationDays: 200 + i * 15 }
})

/** Reading templates: rises from barely there to severe, with the field's usual spread of ε, path, load and wind. */
function readingTemplates(): Array<Partial<FindingValues>> {
  const out: Array<Partial<FindingValues>> = []
  const rises = [0.4, 1.6, 2.6, 4.5, 7, 10, 13, 17, 24, 32, 45, 60]
  const ambients = [4, 12, 19, 27]
  const overAmbient = [3, 9, 16]
  const eps = [0.95, 0.92, 0.88, 0.85, 0.75, 0.65]
  const methods = ['reflector', 'direct', 'estimated'] as const
  const distances = [1.5, 3, 5, 8, 14, 25]
  let k = 0
  for (const rise of rises) {
    for (const ambientC of ambients) {
      for (const over of overAmbient) {
        k++
        const referenceC = ambientC + over
        const t: Partial<FindingValues> = {
          apparentC: Number((referenceC + rise).toFixed(1)),
          referenceC,
          ambientC,
          emissivity: eps[k % eps.length],
          reflectedC: ambientC + (k % 3) * 2,
          reflectedMethod: methods[k % methods.length],
          distanceM: distances[k % distances.length],
        }
        if (k % 4 === 1) Object.assign(t, { loadA: 180 + (k % 5) * 60, ratedA: 400 + (k % 3) * 200 })
        if (k % 6 === 2) t.windMs = 1 + (k % 5) * 1.5
        if (k % 9 === 4) t.transmittance = 0.97
        if (k % 11 === 7) Object.assign(t, { windowTransmittance: 0.6, windowC: ambientC + 2 })
        if (k % 13 === 5) delete t.referenceC // ranked over ambient only
        out.push(t)
      }
    }
  }
  // Below the lowest band: a barely warm part against its neighbour, no ambient recorded (so no rise over ambient).
  for (const [i, rise] of [0.2, 0.4, 0.6, 0.8].entries()) {
    out.push({ apparentC: 20 + i * 4 + rise, referenceC: 20 + i * 4, emissivity: eps[i]!, reflectedC: 14, reflectedMethod: methods[i % 3], distanceM: distances[i] })
  }
  return out
}

/** Re-scans after a good repair: the part reads as its neighbour (no ambient → only the rise over the reference ranks). */
function repairedTemplates(): Array<Partial<FindingValues>> {
  return [0.1, 0.3, 0.5, 0.7].map((d, i) => ({
    apparentC: 22 + i * 3 + d, referenceC: 22 + i * 3, emissivity: 0.92, reflectedC: 15, reflectedMethod: 'reflector' as const, distanceM: 4,
  }))
}

/** One reading through the engine, as server/services/finding-parts.ts (readingColumns + computedColumns) stores it. */
function engineRow(t: Partial<FindingValues>, inst: (typeof INSTRUMENTS)[number], today: string, calibrationDue: string) {
  const { reading, options } = findingChainInput(t as FindingValues, {
    bandFromUm: inst.from, bandToUm: inst.to, accuracyK: inst.accK, accuracyPct: inst.accPct, ifovMrad: inst.ifov, calibrationDue,
  }, { criteriaId: CRITERIA_ID, today })
  const chain = correctionChain(reading, options)
  // The server's own column mapping (findingColumns does the same); warnings stay an array here because the rows
  // travel to PostgreSQL as one JSON document, where the column is read as jsonb.
  return {
    ...readingColumns(t as FindingValues),
    ...computedColumns(chain),
    warnings: chain.warnings,
    action: chain.rank.action,
    repair_deadline_days: chain.rank.repairDeadlineDays,
  }
}

const COMBO_COLUMNS = `instrument_no int, band_key int, idx int, apparent_c float8, reference_c float8, ambient_c float8, emissivity float8,
  reflected_c float8, reflected_method text, distance_m float8, transmittance float8, window_transmittance float8, window_c float8,
  load_a float8, rated_a float8, wind_ms float8, object_c float8, rise_over_reference_k float8, rise_over_ambient_k float8,
  load_scaled_rise_k float8, band smallint, band_basis text, action text, repair_deadline_days int, uncertainty_low_c float8,
  uncertainty_high_c float8, warnings jsonb, criteria_id text, criteria_version int`
const READING_COLUMNS = `apparent_c, reference_c, ambient_c, emissivity, reflected_c, reflected_method, distance_m, transmittance,
  window_transmittance, window_c, load_a, rated_a, wind_ms, object_c, rise_over_reference_k, rise_over_ambient_k, load_scaled_rise_k,
  band, band_basis, uncertainty_low_c, uncertainty_high_c, criteria_id, criteria_version`

/** Secondary (non-constraint) indexes of a table, to drop before a bulk insert and build once after it. */
async function secondaryIndexes(trx: Trx, table: string) {
  const { rows } = await sql<{ name: string; def: string }>`select i.indexname as name, i.indexdef as def
    from pg_indexes i where i.schemaname = 'public' and i.tablename = ${table}
      and not exists (select 1 from pg_constraint c where c.conname = i.indexname)`.execute(trx)
  return rows
}

/** Adds the fieldwork to the large organisation (its sites and assets must be there). */
export async function seedLargeFieldwork(trx: Trx, o: { orgId: string; ownerId: string; passwordHash: string; say: Say }) {
  const { orgId, ownerId, say } = o
  const step = (() => {
    let t = Date.now()
    return (what: string) => {
      say(`  ${what} (${((Date.now() - t) / 1000).toFixed(1)} s)`)
      t = Date.now()
    }
  })()
  const { rows: [row] } = await sql<{ today: string }>`select to_char((now() at time zone 'Europe/London')::date, 'YYYY-MM-DD') as today`.execute(trx)
  const today = row!.today
  // h(n, salt) as in the first stage (defined again so this stage can also run on its own).
  await sql`create or replace function pg_temp.h(n bigint, salt int) returns int language sql immutable
    as 'select hashint8(n * 1000 + salt) & 2147483647'`.execute(trx)

  // People: users are global (kept across --replace), memberships belong to the organisation.
  const people = Object.entries(PEOPLE).flatMap(([role, names]) => names.map((name, i) => ({
    role, name, email: `large-${role}-${String(i + 1).padStart(2, '0')}@greyfield.example`,
  })))
  await sql`insert into users (email, name, password_hash, time_zone)
    select p.email, p.name, ${o.passwordHash}, 'Europe/London'
    from jsonb_to_recordset(${JSON.stringify(people)}::jsonb) as p(email text, name text)
    where not exists (select 1 from users u where lower(u.email) = p.email)`.execute(trx)
  await sql`insert into memberships (organisation_id, user_id, role)
    select ${orgId}::uuid, u.id, p.role
    from jsonb_to_recordset(${JSON.stringify(people)}::jsonb) as p(email text, role text)
    join users u on lower(u.email) = p.email`.execute(trx)
  const ids = async (role: string) => (await sql<{ id: string }>`select u.id from users u
    where lower(u.email) like ${`large-${role}-%@greyfield.example`} order by u.email`.execute(trx)).rows.map((r) => r.id)
  const managers = await ids('manager')
  const thermographers = await ids('thermographer')
  const crew = await ids('crew')
  // A paid plan, so the organisation never turns read-only under the benchmark.
  await sql`insert into organisation_billing (organisation_id, plan, billing_interval, status, seats_paid, current_period_end)
    values (${orgId}, 'utility', 'year', 'active', 40, now() + interval '365 days')
    on conflict (organisation_id) do nothing`.execute(trx)

  const instrumentIds: string[] = []
  for (const inst of INSTRUMENTS) {
    const { rows: [r] } = await sql<{ id: string }>`insert into instruments (organisation_id, make, model, serial, band_from_um, band_to_um,
        ifov_mrad, accuracy_k, accuracy_pct, calibration_due)
      values (${orgId}, ${inst.make}, ${inst.model}, ${inst.serial}, ${inst.from}, ${inst.to}, ${inst.ifov}, ${inst.accK}, ${inst.accPct},
        ${today}::date + ${inst.calibrationDays}::int)
      returning id`.execute(trx)
    instrumentIds.push(r!.id)
  }

  // The engine, once per (imager, reading template).
  const combos: Array<Record<string, unknown>> = []
  const templates = readingTemplates()
  const repaired = repairedTemplates()
  INSTRUMENTS.forEach((inst, n) => {
    const due = new Date(Date.parse(`${today}T00:00:00Z`) + inst.calibrationDays * 86_400_000).toISOString().slice(0, 10)
    const byKey = new Map<number, number>()
    const add = (row: ReturnType<typeof engineRow>, key: number) => {
      const idx = byKey.get(key) ?? 0
      byKey.set(key, idx + 1)
      combos.push({ instrument_no: n + 1, band_key: key, idx, ...row })
    }
    for (const t of templates) {
      const row = engineRow(t, inst, today, due)
      add(row, row.band ?? 0)
    }
    for (const t of repaired) {
      const row = engineRow(t, inst, today, due)
      if (row.band !== null) throw new Error(`A repaired-reading template ranks band ${row.band}; adjust repairedTemplates().`)
      add(row, -1)
    }
    for (const key of [0, 1, 2, 3, 4]) if (!byKey.get(key)) throw new Error(`Imager ${n + 1} has no reading template in band key ${key}.`)
  })
  await sql`create temporary table combos on commit drop as
    select * from jsonb_to_recordset(${JSON.stringify(combos)}::jsonb) as x(${sql.raw(COMBO_COLUMNS)})`.execute(trx)
  await sql`create temporary table combo_counts on commit drop as
    select instrument_no, band_key, count(*)::int as n from combos group by 1, 2`.execute(trx)
  step(`${combos.length} engine results (${templates.length + repaired.length} readings × ${INSTRUMENTS.length} imagers)`)

  // Numbered sites and assets (the same order the first stage generated them in).
  await sql`create temporary table sn on commit drop as
    select id, name, row_number() over (order by code)::int as n from sites where organisation_id = ${orgId}`.execute(trx)
  await sql`create temporary table an on commit drop as
    select a.id, a.label, a.site_id, s.n as site_n, row_number() over (partition by a.site_id order by a.label, a.id)::int as j
    from assets a join sn s on s.id = a.site_id where a.organisation_id = ${orgId}`.execute(trx)
  await sql`create unique index on sn (n)`.execute(trx)
  await sql`create index on an (site_n)`.execute(trx)
  // Temporary tables have no statistics until analysed; without them the planner picks nested loops over 100 000 rows.
  await sql`analyze sn`.execute(trx)
  await sql`analyze an`.execute(trx)

  // Surveys: k = 1 … ROUNDS × 1 000 (round r, index i), plus 25 planned for the coming weeks.
  await sql`create temporary table sv on commit drop as
    select gen_random_uuid() as id, k, r, i,
      (${today}::date - (${ROUNDS} - r) * ${ROUND_DAYS} + (i * ${ROUND_DAYS}) / ${SURVEYS_PER_ROUND})::date as planned_for,
      case when r < ${ROUNDS} - 1 or i < 900 then 'reviewed'
        when i >= ${OWNER_IN_PROGRESS[0]} and i < ${OWNER_IN_PROGRESS[1]} then 'in_progress'
        when i >= ${OWNER_RETURNED[0]} and i < ${OWNER_RETURNED[1]} then 'returned'
        else 'submitted' end as state,
      case when r = ${ROUNDS} - 1 and i >= ${OWNER_IN_PROGRESS[0]} and i < ${OWNER_RETURNED[1]} then ${ownerId}::uuid
        else (${thermographers}::uuid[])[1 + (i * 7 + r) % ${thermographers.length}] end as thermographer_id,
      1 + pg_temp.h(k, 30) % ${INSTRUMENTS.length} as instrument_no
    from (select k, (k - 1) / ${SURVEYS_PER_ROUND} as r, (k - 1) % ${SURVEYS_PER_ROUND} as i
          from generate_series(1, ${ROUNDS * SURVEYS_PER_ROUND}) k) g
    union all
    select gen_random_uuid(), ${ROUNDS * SURVEYS_PER_ROUND}::int + p, ${ROUNDS}::int, p - 1, ${today}::date + p, 'planned',
      (${thermographers}::uuid[])[1 + p % ${thermographers.length}], 1 + pg_temp.h(p, 31) % ${INSTRUMENTS.length}
    from generate_series(1, 25) p`.execute(trx)
  await sql`create unique index on sv (k)`.execute(trx)
  await sql`analyze sv`.execute(trx)
  const at = (day: string, hour: string) => sql.raw(`((${day})::timestamp + interval '${hour}') at time zone 'Europe/London'`)
  await sql`insert into surveys (id, organisation_id, route_id, planned_for, thermographer_id, instrument_id, state, review_comments,
      reviewed_by, started_at, submitted_at, reviewed_at, created_by, created_at, updated_at)
    select sv.id, ${orgId}, null, sv.planned_for, sv.thermographer_id, (${instrumentIds}::uuid[])[sv.instrument_no], sv.state,
      case sv.state when 'reviewed' then 'Findings ranked; repairs raised where needed.'
        when 'returned' then 'Two readings have no reference temperature: add one where a similar part was in view.' else '' end,
      case when sv.state = 'reviewed' then (${managers}::uuid[])[1 + sv.k % ${managers.length}] end,
      case when sv.state <> 'planned' then ${at('sv.planned_for', '7 hours 30 minutes')} end,
      case when sv.state in ('submitted', 'reviewed', 'returned') then ${at('sv.planned_for', '16 hours')} end,
      case when sv.state = 'reviewed' then ${at('sv.planned_for', '2 days 10 hours')} end,
      (${managers}::uuid[])[1 + sv.k % ${managers.length}],
      ${at('sv.planned_for', '-14 days')}, ${at('sv.planned_for', '16 hours')}
    from sv order by sv.k`.execute(trx)
  // Survey i visits sites 5i+1 … 5i+5 (the 25 planned ones visit the first 125 sites).
  await sql`create temporary table ss on commit drop as
    select sv.id as survey_id, sv.k, sv.r, sv.state, sv.planned_for, sv.thermographer_id, sv.instrument_no, sn.id as site_id, sn.n as site_n, p.pos
    from sv cross join generate_series(0, ${SITES_PER_SURVEY - 1}) as p(pos)
    join sn on sn.n = sv.i * ${SITES_PER_SURVEY} + p.pos + 1`.execute(trx)
  await sql`analyze ss`.execute(trx)
  await sql`insert into survey_sites (organisation_id, survey_id, site_id, position, ambient_c, wind_ms, humidity_pct, sky, load_notes)
    select ${orgId}, ss.survey_id, ss.site_id, ss.pos,
      case when ss.state <> 'planned' then 2 + pg_temp.h(ss.k * 8 + ss.pos, 32) % 24 end,
      case when ss.state <> 'planned' then (pg_temp.h(ss.k * 8 + ss.pos, 33) % 70) / 10.0 end,
      case when ss.state <> 'planned' then 45 + pg_temp.h(ss.k * 8 + ss.pos, 34) % 50 end,
      case when ss.state <> 'planned' then (array['clear', 'partly_cloudy', 'overcast', 'rain', 'indoors'])[1 + pg_temp.h(ss.k * 8 + ss.pos, 35) % 5] end,
      case when ss.state <> 'planned' and ss.pos = 0 then 'Feeders at about 60 % of rating.' else '' end
    from ss order by ss.k, ss.pos`.execute(trx)
  step(`${ROUNDS * SURVEYS_PER_ROUND + 25} surveys visiting ${ROUNDS * SURVEYS_PER_ROUND * SITES_PER_SURVEY + 125} sites`)

  // Checks: every asset of every visited site, except the last two sites of a survey still in progress.
  // 2 % not reached, 25 % with a finding, the rest clear.
  const checkIndexes = await secondaryIndexes(trx, 'checks')
  for (const ix of checkIndexes) await sql`drop index ${sql.id(ix.name)}`.execute(trx)
  await sql`create temporary table ck on commit drop as
    select gen_random_uuid() as id, ss.survey_id, ss.k, ss.r, ss.state, ss.instrument_no, ss.thermographer_id, an.id as asset_id, an.label,
      ss.site_id, an.site_n, an.j,
      case when pg_temp.h(an.site_n * 32 + an.j + ss.r * 1000000, 40) % 100 < 2 then 'not_reached'
        when pg_temp.h(an.site_n * 32 + an.j + ss.r * 1000000, 40) % 100 < 27 then 'finding' else 'clear' end as outcome,
      (${at('ss.planned_for', '8 hours')}) + ss.pos * interval '70 minutes' + an.j * interval '3 minutes' as created_at
    from ss join an on an.site_n = ss.site_n
    where ss.state <> 'planned' and not (ss.state = 'in_progress' and ss.pos >= 3)`.execute(trx)
  await sql`analyze ck`.execute(trx)
  await sql`insert into checks (id, organisation_id, survey_id, asset_id, outcome, reason, note, checked_by, created_at, updated_at)
    select ck.id, ${orgId}, ck.survey_id, ck.asset_id, ck.outcome,
      case when ck.outcome = 'not_reached' then (array['no_access', 'de_energised', 'outage', 'unsafe', 'other'])[1 + pg_temp.h(ck.site_n * 32 + ck.j, 41) % 5] end,
      case when ck.outcome = 'not_reached' and pg_temp.h(ck.site_n * 32 + ck.j, 41) % 5 = 4 then 'Cabinet door jammed; reported to the site owner.' else '' end,
      ck.thermographer_id, ck.created_at, ck.created_at
    from ck order by ck.k, ck.created_at`.execute(trx)
  for (const ix of checkIndexes) await sql.raw(ix.def).execute(trx)
  const { rows: [checkCount] } = await sql<{ n: number }>`select count(*)::int as n from ck`.execute(trx)
  step(`${checkCount!.n.toLocaleString('en-GB')} checks`)

  // Findings: exactly FINDINGS, spread evenly over the checks with a finding (about two per check). Bands (by hash):
  // 6 % band 1, 15 % band 2, 30 % band 3, 45 % band 4, 4 % below the lowest band.
  await sql`create temporary table fc on commit drop as
    select ck.*, row_number() over (order by ck.k, ck.created_at, ck.id)::int as m from ck where ck.outcome = 'finding'`.execute(trx)
  await sql`create unique index on fc (m)`.execute(trx)
  await sql`analyze fc`.execute(trx)
  const findingIndexes = await secondaryIndexes(trx, 'findings')
  for (const ix of findingIndexes) await sql`drop index ${sql.id(ix.name)}`.execute(trx)
  await sql`create temporary table fn on commit drop as
    select gen_random_uuid() as id, g.n, fc.id as check_id, fc.k, fc.r, fc.state, fc.instrument_no, fc.site_id, fc.asset_id, fc.label,
      fc.created_at + (g.n % 7) * interval '1 minute' as created_at,
      case when pg_temp.h(g.n, 50) % 100 < 4 then 0 when pg_temp.h(g.n, 50) % 100 < 10 then 1 when pg_temp.h(g.n, 50) % 100 < 25 then 2
        when pg_temp.h(g.n, 50) % 100 < 55 then 3 else 4 end as band_key
    from generate_series(1, ${FINDINGS}) g(n)
    join fc on fc.m = (g.n - 1) % (select count(*) from fc) + 1`.execute(trx)
  await sql`create unique index on fn (id)`.execute(trx)
  await sql`analyze fn`.execute(trx)
  await sql`insert into findings (id, organisation_id, check_id, component, phase, ${sql.raw(READING_COLUMNS)}, action, repair_deadline_days,
      warnings, probable_cause, cause_notes, notes, reviewed_band, review_reason, reviewed_by, reviewed_at, closed_at, closed_reason, created_at, updated_at)
    select fn.id, ${orgId}, fn.check_id,
      (array['Line-side connector', 'Load-side connector', 'Bushing clamp', 'Breaker stab', 'Disconnect jaw', 'Bus joint', 'Cable lug',
        'Fuse clip', 'Neutral bar', 'CT secondary terminal'])[1 + pg_temp.h(fn.n, 52) % 10],
      (array['A', 'B', 'C', 'A', 'B', 'C', 'N', ''])[1 + pg_temp.h(fn.n, 53) % 8],
      ${sql.raw(READING_COLUMNS.split(',').map((c) => `x.${c.trim()}`).join(', '))}, x.action, x.repair_deadline_days, x.warnings,
      (array['loose_connection', 'loose_connection', 'loose_connection', 'corroded_connection', 'corroded_connection', 'overload',
        'load_imbalance', 'failing_component', 'harmonics', 'induced_heating', 'other'])[1 + pg_temp.h(fn.n, 54) % 11],
      case when pg_temp.h(fn.n, 54) % 11 = 10 then 'Heating at the palm; cause to be found at the outage.' else '' end,
      case when fn.n % 5 = 0 then 'Seen from the fence line; re-check at the next outage.' else '' end,
      rv.band, rv.reason, rv.by, rv.at,
      -- Record-and-trend findings of the first two rounds were superseded by the next survey's reading.
      case when fn.r < 2 and x.band = 4 and pg_temp.h(fn.n, 56) % 10 < 7 then fn.created_at + interval '${sql.raw(String(ROUND_DAYS))} days' end,
      case when fn.r < 2 and x.band = 4 and pg_temp.h(fn.n, 56) % 10 < 7 then 'Superseded by the next survey (recorded for trending).' end,
      fn.created_at, fn.created_at
    from fn
    join combo_counts cc on cc.instrument_no = fn.instrument_no and cc.band_key = fn.band_key
    join combos x on x.instrument_no = fn.instrument_no and x.band_key = fn.band_key and x.idx = pg_temp.h(fn.n, 51) % cc.n
    join sv on sv.k = fn.k
    join surveys s on s.id = sv.id
    -- One finding in a hundred on a reviewed survey has its band corrected by the reviewing manager.
    left join lateral (select case when x.band is null or x.band = 4 then 3 else x.band + 1 end::smallint as band,
        'Reference phase was also warm; the rise is overstated. Ranked one band lower.' as reason, s.reviewed_by as by, s.reviewed_at as at
      where s.state = 'reviewed' and pg_temp.h(fn.n, 55) % 100 = 0) rv on true
    order by fn.n`.execute(trx)
  for (const ix of findingIndexes) await sql.raw(ix.def).execute(trx)
  step(`${FINDINGS.toLocaleString('en-GB')} findings`)

  // Work orders: WORK_ORDERS findings of band 1–3 on reviewed surveys, one each, chosen by hash. Older ones are mostly
  // closed (verified by a re-scan), recent ones spread over the backlog states.
  await sql`create temporary table wo on commit drop as
    select gen_random_uuid() as id, row_number() over (order by c.reviewed_at, c.h, c.finding_id)::int as w, c.*
    from (
      select f.id as finding_id, coalesce(f.reviewed_band, f.band) as band, fn.r, fn.k, fn.site_id, fn.instrument_no, sn.name as site_name,
        fn.label, f.component, s.reviewed_at, (s.reviewed_at at time zone 'Europe/London')::date + 1 + pick.h % 3 as raised_on,
        s.thermographer_id, pick.h
      from fn
      join findings f on f.id = fn.id
      join sv on sv.k = fn.k
      join surveys s on s.id = sv.id
      join sn on sn.id = fn.site_id
      cross join lateral (select pg_temp.h(fn.n, 60) as h) pick
      where s.state = 'reviewed' and coalesce(f.reviewed_band, f.band) between 1 and 3
      order by pick.h, fn.n
      limit ${WORK_ORDERS}
    ) c`.execute(trx)
  await sql`create unique index on wo (w)`.execute(trx)
  await sql`analyze wo`.execute(trx)
  await sql`alter table wo add column state text, add column closed_on date`.execute(trx)
  // State by age (round of the finding) and hash; a closed one was verified 5–40 days after it was raised.
  await sql`update wo set state = case
      when r < 2 then (case when h % 100 < 86 then 'closed' when h % 100 < 91 then 'cancelled' when h % 100 < 95 then 'deferred' else 'open' end)
      when r = 2 then (case when h % 100 < 50 then 'closed' when h % 100 < 60 then 'awaiting_verification' when h % 100 < 70 then 'in_repair'
        when h % 100 < 80 then 'planned' when h % 100 < 95 then 'open' when h % 100 < 97 then 'cancelled' else 'deferred' end)
      else (case when h % 100 < 10 then 'closed' when h % 100 < 20 then 'awaiting_verification' when h % 100 < 35 then 'in_repair'
        when h % 100 < 55 then 'planned' when h % 100 < 95 then 'open' else 'deferred' end) end`.execute(trx)
  await sql`update wo set state = 'in_repair' where state = 'closed' and raised_on + 5 + h % 36 >= ${today}::date`.execute(trx)
  await sql`update wo set closed_on = raised_on + 5 + h % 36 where state = 'closed'`.execute(trx)
  await sql`create index on wo (finding_id)`.execute(trx)
  await sql`analyze wo`.execute(trx)
  await sql`insert into work_orders (id, organisation_id, site_id, number, title, instructions, state, band, due_on, state_reason, deferred_until,
      cause_found, parts, work_done, time_spent_minutes, created_by, closed_at, version, created_at, updated_at)
    select wo.id, ${orgId}, wo.site_id, wo.w, left(wo.site_name || ': ' || wo.label || ', ' || wo.component, 160),
      'Isolate under permit. Clean the contact faces, replace damaged hardware and torque to the maker''s figure.',
      wo.state, wo.band,
      case when wo.state = 'deferred' then ${today}::date + 10 + wo.h % 80
        else wo.raised_on + (case wo.band when 1 then 1 when 2 then 30 when 3 then 180 end) end,
      case wo.state when 'deferred' then 'Needs a feeder outage; the next planned window is booked.'
        when 'cancelled' then 'Asset replaced under the capital programme.' else '' end,
      case when wo.state = 'deferred' then ${today}::date + 10 + wo.h % 80 end,
      case when wo.state in ('awaiting_verification', 'closed') then 'Under-torqued bolted joint, oxidised faces' else '' end,
      case when wo.state in ('awaiting_verification', 'closed') then '1 × joint kit' else '' end,
      case when wo.state in ('awaiting_verification', 'closed') then 'Cleaned, greased and re-torqued the joint' else '' end,
      case when wo.state in ('awaiting_verification', 'closed') then 30 + wo.h % 200 end,
      (${managers}::uuid[])[1 + wo.w % ${managers.length}],
      case when wo.state = 'closed' then ${at('wo.closed_on', '11 hours')} end,
      case wo.state when 'open' then 2 when 'planned' then 3 when 'in_repair' then 3 when 'deferred' then 3 when 'cancelled' then 3 else 5 end,
      ${at('wo.raised_on', '9 hours')}, ${at('coalesce(wo.closed_on, wo.raised_on)', '11 hours')}
    from wo order by wo.w`.execute(trx)
  await sql`update organisations set work_order_counter = ${WORK_ORDERS} where id = ${orgId}`.execute(trx)
  await sql`insert into work_order_findings (organisation_id, work_order_id, finding_id, created_at)
    select ${orgId}, wo.id, wo.finding_id, ${at('wo.raised_on', '9 hours')} from wo order by wo.w`.execute(trx)
  await sql`insert into work_order_assignees (organisation_id, work_order_id, user_id, created_at)
    select ${orgId}::uuid, wo.id, (${crew}::uuid[])[1 + wo.w % ${crew.length}], ${at('wo.raised_on', '9 hours')} from wo
    union all
    select ${orgId}::uuid, wo.id, (${crew}::uuid[])[1 + (wo.w + 5) % ${crew.length}], ${at('wo.raised_on', '9 hours')} from wo where wo.w % 4 = 0`.execute(trx)

  // Verifications: waiting for those awaiting one, passed (a cool re-scan through the engine) for the closed ones.
  await sql`create temporary table vf on commit drop as
    select gen_random_uuid() as vid, wo.* from wo where wo.state in ('awaiting_verification', 'closed')`.execute(trx)
  await sql`create unique index on vf (w)`.execute(trx)
  await sql`analyze vf`.execute(trx)
  await sql`insert into verifications (id, organisation_id, work_order_id, finding_id, site_id, thermographer_id, instrument_id, state, warnings,
      recorded_by, recorded_at, ${sql.raw(READING_COLUMNS)}, created_at, updated_at)
    select vf.vid, ${orgId}, vf.id, vf.finding_id, vf.site_id, vf.thermographer_id,
      case when vf.state = 'closed' then (${instrumentIds}::uuid[])[vf.instrument_no] end,
      case when vf.state = 'closed' then 'passed' else 'waiting' end,
      case when vf.state = 'closed' then x.warnings else '[]'::jsonb end,
      case when vf.state = 'closed' then vf.thermographer_id end,
      case when vf.state = 'closed' then ${at('vf.closed_on', '11 hours')} end,
      ${sql.raw(READING_COLUMNS.split(',').map((c) => `case when vf.state = 'closed' then x.${c.trim()} end`).join(', '))},
      ${at('coalesce(vf.closed_on, vf.raised_on + 4)', '8 hours')}, ${at('coalesce(vf.closed_on, vf.raised_on + 4)', '11 hours')}
    from vf
    join combo_counts cc on cc.instrument_no = vf.instrument_no and cc.band_key = -1
    join combos x on x.instrument_no = vf.instrument_no and x.band_key = -1 and x.idx = vf.h % cc.n`.execute(trx)
  await sql`update findings f set closed_at = ${at('wo.closed_on', '11 hours')},
      closed_reason = 'Verified repaired: the re-scan on ' || to_char(wo.closed_on, 'YYYY-MM-DD') || ' under WO-' || wo.w || ' is below the lowest band.'
    from wo where wo.state = 'closed' and f.organisation_id = ${orgId} and f.id = wo.finding_id`.execute(trx)
  step(`${WORK_ORDERS.toLocaleString('en-GB')} work orders with assignees and verifications`)

  // The timeline of each work order, as the services write it.
  const eventIndexes = await secondaryIndexes(trx, 'record_events')
  for (const ix of eventIndexes) await sql`drop index ${sql.id(ix.name)}`.execute(trx)
  const crewOf = sql.raw(`(array[${crew.map((c) => `'${c}'::uuid`).join(', ')}])[1 + wo.w % ${crew.length}]`)
  const mgrOf = sql.raw(`(array[${managers.map((c) => `'${c}'::uuid`).join(', ')}])[1 + wo.w % ${managers.length}]`)
  await sql`insert into record_events (organisation_id, subject_kind, subject_id, work_order_id, actor_id, action, reason, details, created_at)
    select ${orgId}, e.kind, e.subject, wo.id, e.actor, e.action, e.reason, e.details, e.at
    from wo
    left join vf on vf.w = wo.w
    cross join lateral (values
      ('work_order', wo.id, ${mgrOf}, 'raised', '', jsonb_build_object('reference', 'WO-' || wo.w, 'findingCount', 1, 'band', wo.band), ${at('wo.raised_on', '9 hours')}, true),
      ('finding', wo.finding_id, ${mgrOf}, 'raised', '', jsonb_build_object('reference', 'WO-' || wo.w, 'findingCount', 1), ${at('wo.raised_on', '9 hours')}, true),
      ('work_order', wo.id, ${mgrOf}, 'assigned', '', jsonb_build_object('userIds', jsonb_build_array(${crewOf})), ${at('wo.raised_on', '9 hours 1 minute')}, true),
      ('work_order', wo.id, ${crewOf}, 'state_changed', '', jsonb_build_object('from', 'open', 'to', 'planned'), ${at('wo.raised_on', '14 hours')}, wo.state = 'planned'),
      ('work_order', wo.id, ${crewOf}, 'state_changed', '', jsonb_build_object('from', 'open', 'to', 'in_repair'), ${at('wo.raised_on + 2', '8 hours')}, wo.state in ('in_repair', 'awaiting_verification', 'closed')),
      ('work_order', wo.id, ${crewOf}, 'work_recorded', '', '{}'::jsonb, ${at('wo.raised_on + 2', '12 hours')}, wo.state in ('awaiting_verification', 'closed')),
      ('work_order', wo.id, ${crewOf}, 'state_changed', '', jsonb_build_object('from', 'in_repair', 'to', 'awaiting_verification'), ${at('wo.raised_on + 2', '13 hours')}, wo.state in ('awaiting_verification', 'closed')),
      ('verification', vf.vid, ${crewOf}, 'verification_requested', '', jsonb_build_object('component', wo.component, 'findingId', wo.finding_id), ${at('wo.raised_on + 2', '13 hours')}, vf.vid is not null),
      ('verification', vf.vid, wo.thermographer_id, 'verification_passed', '', jsonb_build_object('component', wo.component, 'findingId', wo.finding_id), ${at('wo.closed_on', '11 hours')}, wo.state = 'closed'),
      ('finding', wo.finding_id, wo.thermographer_id, 'closed_verified', 'Verified repaired.', '{}'::jsonb, ${at('wo.closed_on', '11 hours')}, wo.state = 'closed'),
      ('work_order', wo.id, wo.thermographer_id, 'closed', '', '{}'::jsonb, ${at('wo.closed_on', '11 hours')}, wo.state = 'closed'),
      ('work_order', wo.id, ${crewOf}, 'deferred', 'Needs a feeder outage; the next planned window is booked.', jsonb_build_object('from', 'open'), ${at('wo.raised_on + 3', '10 hours')}, wo.state = 'deferred'),
      ('work_order', wo.id, ${mgrOf}, 'cancelled', 'Asset replaced under the capital programme.', jsonb_build_object('from', 'open'), ${at('wo.raised_on + 20', '10 hours')}, wo.state = 'cancelled')
    ) as e(kind, subject, actor, action, reason, details, at, keep)
    where e.keep
    order by wo.w, e.at`.execute(trx)
  for (const ix of eventIndexes) await sql.raw(ix.def).execute(trx)
  const { rows: [events] } = await sql<{ n: number }>`select count(*)::int as n from record_events where organisation_id = ${orgId}`.execute(trx)
  step(`${events!.n.toLocaleString('en-GB')} timeline entries`)
}
