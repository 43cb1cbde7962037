// p50/p95 of the asset list API (GET /api/orgs/:org/assets) for an organisation with 100 000 assets, through
// the built app over HTTP (sign-in, tenant check, validation, two SQL queries, JSON) — beside a baseline measured
// in the same run: the same requests with the register's list indexes dropped (they are rebuilt afterwards).
//
//   set -a; . .data/dev/services.env; set +a
//   node --import tsx scripts/seed-large.ts          # once
//   node --import tsx scripts/bench/assets-list.bench.ts [runs]
//
// Uses the app at NUXT_APP_URL, or starts the built server itself. Run it on a development database: while the
// baseline runs, the indexes are missing for everyone.
import { sql, type Kysely } from 'kysely'
import { connect } from '../../db/migrator'
import { HttpSession, percentile, withApp } from './http-session'

const SLUG = 'greyfield-large'
const ROUNDS = 2
const RUNS = Math.max(ROUNDS, Math.round(Number(process.argv[2] ?? 40) / ROUNDS) * ROUNDS)
const BASELINE_RUNS = Math.max(ROUNDS * 5, Math.round(RUNS / 2 / ROUNDS) * ROUNDS)
const WARM_UP = 3
// The indexes db/migrations/20261202_1000_register_search_and_imports.ts adds for the lists.
const LIST_INDEXES = [
  'assets_active_label_idx', 'assets_active_site_label_idx', 'assets_active_class_idx', 'assets_active_criticality_idx',
  'assets_active_condition_idx', 'assets_active_updated_idx', 'assets_search_trgm_idx', 'sites_active_name_idx', 'sites_search_trgm_idx',
]

interface Scenario { name: string; path: string }
interface Timing { p50: number; p95: number }

// Requests of each round, kept per scenario so that rounds with and without the indexes can alternate: load from
// other work on the machine then falls on both sides alike.
async function sample(s: HttpSession, path: string, runs: number, into: number[]): Promise<number> {
  let total = 0
  for (let i = 0; i < WARM_UP + runs; i++) {
    const t = performance.now()
    const res = await s.request('GET', path)
    const elapsed = performance.now() - t
    if (res.status !== 200) throw new Error(`${path}: ${res.status} ${res.text.slice(0, 300)}`)
    if (i >= WARM_UP) into.push(elapsed)
    total = res.json().total ?? 0
  }
  return total
}

async function withoutListIndexes<T>(db: Kysely<any>, run: () => Promise<T>): Promise<T> {
  const { rows } = await sql<{ name: string; def: string }>`select indexname as name, indexdef as def from pg_indexes
    where schemaname = 'public' and indexname in (${sql.join(LIST_INDEXES)})`.execute(db)
  for (const ix of rows) await sql`drop index ${sql.id(ix.name)}`.execute(db)
  await sql`analyze assets`.execute(db)
  try {
    return await run()
  } finally {
    for (const ix of rows) await sql.raw(ix.def).execute(db)
    await sql`analyze assets`.execute(db)
  }
}

const db = connect(process.env.NUXT_DATABASE_URL!, 1)
try {
  await withApp(async (baseUrl) => {
    const s = new HttpSession(baseUrl)
    await s.signIn('large-owner@greyfield.example', 'greybody-large-2026')
    const first = (await s.request('GET', `/api/orgs/${SLUG}/assets?pageSize=50`)).json()
    if (first.total < 90_000) throw new Error(`The organisation has ${first.total} active assets; run scripts/seed-large.ts first.`)
    const lastPage = Math.ceil(first.total / 50)
    const site = (await s.request('GET', `/api/orgs/${SLUG}/sites?q=GF-02500`)).json().items[0]
    const a = (query: string) => `/api/orgs/${SLUG}/assets?pageSize=50${query}`
    const scenarios: Scenario[] = [
      // The floor: a small signed-in organisation request (session, membership, one query), for scale.
      { name: 'floor: member list (5 rows)', path: `/api/orgs/${SLUG}/members` },
      { name: 'first page (label order)', path: a('') },
      { name: 'filtered: class + criticality 4–5', path: a('&class=breaker&criticality=4,5') },
      { name: 'sorted by criticality, desc', path: a('&sort=criticality&dir=desc') },
      { name: 'sorted by site name', path: a('&sort=site') },
      { name: `late page (${lastPage - 1} of ${lastPage})`, path: a(`&page=${lastPage - 1}`) },
      { name: 'search: manufacturer "northgate"', path: a('&q=northgate') },
      { name: 'search: label "TX-07"', path: a('&q=TX-07') },
      { name: 'search: site code "GF-0123"', path: a('&q=GF-0123') },
      { name: 'search: site name "primary" (~600)', path: a('&q=primary') },
      { name: 'one site', path: a(`&site=${site.id}`) },
      { name: 'due within 30 days', path: a('&due=within-30') },
    ]

    const indexed = new Map(scenarios.map((sc) => [sc.name, [] as number[]]))
    const baseline = new Map(scenarios.map((sc) => [sc.name, [] as number[]]))
    const totals = new Map<string, number[]>()
    for (let round = 0; round < ROUNDS; round++) {
      for (const sc of scenarios) totals.set(sc.name, [...(totals.get(sc.name) ?? []), await sample(s, sc.path, RUNS / ROUNDS, indexed.get(sc.name)!)])
      await withoutListIndexes(db, async () => {
        for (const sc of scenarios) totals.get(sc.name)!.push(await sample(s, sc.path, BASELINE_RUNS / ROUNDS, baseline.get(sc.name)!))
      })
    }

    const pad = (v: string, n: number) => v.padStart(n)
    const t = (ms: number[]): Timing => ({ p50: percentile(ms, 50), p95: percentile(ms, 95) })
    console.log(`Asset list API, ${first.total.toLocaleString('en-GB')} active assets, 50 rows per page, over HTTP at ${baseUrl}`)
    console.log(`${RUNS} requests per query with the list indexes, ${BASELINE_RUNS} without them (the baseline), in ${ROUNDS} alternating rounds; ${WARM_UP} warm-up requests per round not counted\n`)
    console.log(`${'query'.padEnd(38)}${pad('matches', 9)}${pad('p50 ms', 9)}${pad('p95 ms', 9)}${pad('base p50', 10)}${pad('base p95', 10)}${pad('p50 gain', 10)}`)
    for (const sc of scenarios) {
      const seen = new Set(totals.get(sc.name))
      if (seen.size !== 1) throw new Error(`${sc.name}: totals differ between rounds: ${[...seen].join(', ')}`)
      const x = t(indexed.get(sc.name)!)
      const b = t(baseline.get(sc.name)!)
      console.log(`${sc.name.padEnd(38)}${pad([...seen][0]!.toLocaleString('en-GB'), 9)}${pad(x.p50.toFixed(1), 9)}${pad(x.p95.toFixed(1), 9)}${pad(b.p50.toFixed(1), 10)}${pad(b.p95.toFixed(1), 10)}${pad(`${(b.p50 / x.p50).toFixed(1)}×`, 10)}`)
    }
    const load = (await import('node:os')).loadavg()[0]!
    console.log(`\n1-minute load average at the end: ${load.toFixed(1)} on ${(await import('node:os')).cpus().length} CPUs (other work on the machine inflates every figure alike).`)
  })
} finally {
  await db.destroy()
}
