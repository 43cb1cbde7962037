// What the tenant wall (db/tenant-wall.ts, db/tenant-connection.ts) costs.
//
//   set -a; . .data/dev/services.env; set +a
//   node --import tsx scripts/seed-large.ts                 # once, for part 2
//   node --import tsx scripts/bench/tenant-wall.bench.ts [queries]
//
// 1. The per-checkout setting: a small tenant query (one site by id, as most handlers run) through Kysely with the
//    app's onReserveConnection hook — the organisation unchanged between checkouts (the hook skips the round trip),
//    and changing on every checkout (worst case: one `set_config` round trip each) — beside the same query without
//    the hook. Rounds alternate so load from other work falls on every variant alike.
// 2. The policy inside queries: register queries of the large organisation (5 000 sites, 100 000 assets) with the
//    wall, and without it (inside a transaction that lifts `force row level security` and is rolled back).
import { CompiledQuery, Kysely, PostgresDialect, sql } from 'kysely'
import pg from 'pg'
import { connect } from '../../db/migrator'
import { tenantReserveHook } from '../../db/tenant-connection'
import { percentile } from './http-session'

const url = process.env.NUXT_DATABASE_URL
if (!url) {
  console.error('NUXT_DATABASE_URL is not set (source .data/<profile>/services.env first).')
  process.exit(1)
}
const QUERIES = Math.max(1000, Number(process.argv[2] ?? 6000))
const ROUNDS = 6
const system = connect(url, 1)

function appLike(hook: boolean, current: () => string) {
  return new Kysely<any>({
    dialect: new PostgresDialect({
      // Without the hook the connection is set once, at connect, so the query sees the same rows.
      pool: new pg.Pool({ connectionString: url, max: 10, ...(hook ? {} : { options: '-c greybody.org=*' }) }),
      ...(hook ? { onReserveConnection: tenantReserveHook(current) } : {}),
    }),
  })
}

async function part1() {
  const orgs = (await system.selectFrom('sites').select(['organisation_id', 'id']).distinctOn('organisation_id').orderBy('organisation_id').limit(2).execute())
  if (orgs.length < 2) throw new Error('Needs sites in two organisations (load the demo data: npm run db:seed).')
  let org = orgs[0]!
  const variants = {
    'no hook (baseline)': appLike(false, () => '*'),
    'hook, same organisation each checkout': appLike(true, () => org.organisation_id),
    'hook, organisation changes each checkout': appLike(true, () => org.organisation_id),
  }
  const samples = new Map<string, number[]>(Object.keys(variants).map((k) => [k, []]))
  const perRound = Math.ceil(QUERIES / ROUNDS)
  for (let round = 0; round < ROUNDS + 1; round++) {
    for (const [name, db] of Object.entries(variants)) {
      for (let i = 0; i < perRound; i++) {
        org = name.includes('changes') ? orgs[i % 2]! : orgs[0]!
        const t = performance.now()
        const row = await db.selectFrom('sites').select(['id', 'name']).where('organisation_id', '=', org.organisation_id).where('id', '=', org.id).executeTakeFirst()
        const ms = performance.now() - t
        if (!row) throw new Error(`${name}: the query saw no row: the setting is wrong`)
        if (round > 0) samples.get(name)!.push(ms) // round 0 warms the pools up
      }
    }
  }
  const base = mean(samples.get('no hook (baseline)')!)
  console.log(`\n1. Setting the organisation per checkout: ${perRound * ROUNDS} queries per variant (one site by id), sequential`)
  for (const [name, ms] of samples) {
    console.log(`   ${name.padEnd(44)} mean ${us(mean(ms))}  p50 ${us(percentile(ms, 50))}  p95 ${us(percentile(ms, 95))}  ${name.startsWith('no hook') ? '' : `(+${us(mean(ms) - base)} a query)`}`)
  }
  for (const db of Object.values(variants)) await db.destroy()
}

async function part2() {
  const org = await system.selectFrom('organisations').select('id').where('slug', '=', 'greyfield-large').executeTakeFirst()
  if (!org) {
    console.log('\n2. Skipped: load the large organisation first (node --import tsx scripts/seed-large.ts).')
    return
  }
  const o = org.id
  const text = sql.raw(`(a.label || ' ' || a.manufacturer || ' ' || a.model)`)
  const queries: Array<[string, ReturnType<typeof sql>]> = [
    ['assets: first page by label', sql`select a.id from assets a where a.organisation_id = ${o} and a.archived_at is null order by lower(a.label), a.id limit 50`],
    ['assets: count of active', sql`select count(*) from assets a where a.organisation_id = ${o} and a.archived_at is null`],
    ['assets: class + criticality 4–5, page', sql`select a.id from assets a where a.organisation_id = ${o} and a.archived_at is null and a.asset_class = 'breaker' and a.criticality in (4, 5) order by a.criticality, lower(a.label), a.id limit 50`],
    ['assets: search "TX-07" (trigram), count', sql`select count(*) from assets a where a.organisation_id = ${o} and a.archived_at is null and ${text} ilike '%TX-07%'`],
    ['assets: search "northgate" (trigram), count', sql`select count(*) from assets a where a.organisation_id = ${o} and a.archived_at is null and ${text} ilike '%northgate%'`],
    ['sites: search "GF-0123" (trigram)', sql`select id from sites where organisation_id = ${o} and code || ' ' || name ilike '%GF-0123%' limit 101`],
  ]
  const RUNS = 15
  console.log(`\n2. Register queries of the large organisation with and without the wall (median of ${RUNS}, as the app role)`)
  await system.connection().execute(async (c) => {
    await sql`select set_config('greybody.org', ${o}, false)`.execute(c)
    const time = async (q: ReturnType<typeof sql>) => {
      const ms: number[] = []
      for (let i = 0; i < RUNS + 2; i++) {
        const t = performance.now()
        await q.execute(c)
        if (i >= 2) ms.push(performance.now() - t)
      }
      return percentile(ms, 50)
    }
    const walled: number[] = []
    for (const [, q] of queries) walled.push(await time(q))
    const open: number[] = []
    await c.executeQuery(CompiledQuery.raw('begin'))
    try {
      for (const t of ['assets', 'sites']) await sql`alter table ${sql.table(t)} no force row level security`.execute(c)
      for (const [, q] of queries) open.push(await time(q))
    } finally {
      await c.executeQuery(CompiledQuery.raw('rollback'))
    }
    queries.forEach(([name], i) => {
      console.log(`   ${name.padEnd(44)} with wall ${ms(walled[i]!)}   without ${ms(open[i]!)}   ×${(walled[i]! / open[i]!).toFixed(1)}`)
    })
  })
}

const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length
const us = (msValue: number) => `${(msValue * 1000).toFixed(0).padStart(5)} µs`
const ms = (v: number) => `${v.toFixed(2).padStart(8)} ms`

try {
  await part1()
  await part2()
} finally {
  await system.destroy()
}
