// Load on the large organisation (scripts/seed-large.ts: 5 000 sites, 100 000 assets, 200 000 findings, 20 000 work
// orders) through the built app over loopback, with autocannon: the findings list with filters and a page, the
// dashboard, opening a finding and saving a finding, each with N connections for a fixed time. Then the findings list's
// own SQL — compiled from the service (server/services/finding-list-sql.ts) with the same parameters — straight
// against PostgreSQL with as many clients for as long, and the ratio app ÷ database.
//
//   set -a; . .data/dev/services.env; set +a
//   node --import tsx scripts/seed-large.ts            # once (a few minutes)
//   node --import tsx scripts/bench/load.bench.ts      # npm run bench:load
//
// Settings (environment): LOAD_SECONDS (15) per scenario, LOAD_WARMUP_SECONDS (3, not counted), LOAD_CONNECTIONS (32),
// LOAD_SCENARIOS (comma list of list,fresh,db,mixed,open,save,dashboard; all by default), LOAD_MIXED_SAVES_PER_S (2). Uses the app at NUXT_APP_URL, or starts
// the built server (.output, or .output-<profile> with GREYBODY_TEST_PROFILE) itself (between scenarios it waits only
// for statements of an app it started; an app already running is not watched). Saves really change findings of
// the owner's open surveys (notes and version; the engine reruns on unchanged readings), so use a development database.
// Targets (issue #9): findings list p95 ≤ 50 ms at 32 connections with no errors; app ÷ database ≤ 3.
import { execFileSync } from 'node:child_process'
import os from 'node:os'
import autocannon from 'autocannon'
import { sql } from 'kysely'
import pg from 'pg'
import { connect } from '../../db/migrator'
import { findingListQueries, type FindingListFilters } from '../../server/services/finding-list-sql'
import { HttpSession, percentile, withApp } from './http-session'

const SLUG = 'greyfield-large'
const OWNER = { email: 'large-owner@greyfield.example', password: 'greybody-large-2026' }
const SECONDS = Number(process.env.LOAD_SECONDS ?? 15)
const WARMUP = Number(process.env.LOAD_WARMUP_SECONDS ?? 3)
const CONNECTIONS = Number(process.env.LOAD_CONNECTIONS ?? 32)
const ONLY = new Set((process.env.LOAD_SCENARIOS ?? 'list,fresh,db,mixed,open,save,dashboard').split(',').map((s) => s.trim()))
// node-postgres names its connections from PGAPPNAME: this script's, and those of the app when the script starts it,
// so it can wait for (and at the end cancel) only the statements it caused.
const APP_NAME = 'greybody-load-bench'
process.env.PGAPPNAME = APP_NAME
const TARGET_LIST_P95_MS = 50
const TARGET_RATIO = 3

interface Figures { name: string; requests: number; rps: number; p50: number; p95: number; p99: number; max: number; errors: number; non2xx: number }

function figures(name: string, ms: number[], seconds: number, errors: number, non2xx: number): Figures {
  return {
    name, requests: ms.length, rps: ms.length / seconds, errors, non2xx,
    p50: percentile(ms, 50), p95: percentile(ms, 95), p99: percentile(ms, 99), max: ms.length ? Math.max(...ms) : NaN,
  }
}

type AcRequest = { method?: string; path: string; headers?: Record<string, string>; body?: string }

/** One autocannon run: every response's own time is kept, so the percentiles are exact (autocannon reports no p95). */
async function cannon(
  baseUrl: string, cookie: string, next: () => AcRequest, seconds: number, onBody?: (status: number, body: string) => void,
  opts: { connections?: number; overallRate?: number; headers?: Record<string, string> } = {},
) {
  const latencies: number[] = []
  let non2xx = 0
  const instance = autocannon({
    url: baseUrl,
    connections: opts.connections ?? CONNECTIONS,
    ...(opts.overallRate ? { overallRate: opts.overallRate } : {}),
    duration: seconds,
    timeout: 30,
    headers: { accept: 'application/json', cookie, origin: new URL(baseUrl).origin, ...opts.headers },
    requests: [{
      setupRequest: (req: any) => {
        const r = next()
        return { ...req, method: r.method ?? 'GET', path: r.path, body: r.body, headers: { ...req.headers, ...r.headers } }
      },
      ...(onBody ? { onResponse: (status: number, body: string) => onBody(status, body) } : {}),
    }],
  } as any)
  instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => {
    latencies.push(ms)
    if (status < 200 || status > 299) non2xx++
  })
  const result: any = await instance
  return { latencies, non2xx, errors: Number(result.errors ?? 0) + Number(result.timeouts ?? 0) }
}

const rotate = <T>(items: T[]) => {
  let i = 0
  return () => items[i++ % items.length]!
}

const fmt = (v: number, d = 1) => (Number.isFinite(v) ? v.toFixed(d) : '—')
function table(rows: Figures[]) {
  console.log(`${'scenario'.padEnd(34)}${'requests'.padStart(9)}${'req/s'.padStart(8)}${'p50 ms'.padStart(9)}${'p95 ms'.padStart(9)}${'p99 ms'.padStart(9)}${'max ms'.padStart(9)}${'errors'.padStart(8)}${'non-2xx'.padStart(9)}`)
  for (const r of rows) {
    console.log(`${r.name.padEnd(34)}${String(r.requests).padStart(9)}${fmt(r.rps, 0).padStart(8)}${fmt(r.p50).padStart(9)}${fmt(r.p95).padStart(9)}${fmt(r.p99).padStart(9)}${fmt(r.max).padStart(9)}${String(r.errors).padStart(8)}${String(r.non2xx).padStart(9)}`)
  }
}

function machine() {
  let commit = ''
  try {
    const git = (args: string[]) => execFileSync('git', args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] }).trim()
    commit = git(['rev-parse', '--short', 'HEAD'])
    if (git(['status', '--porcelain', '--untracked-files=no'])) commit += ' (with uncommitted changes)'
  } catch { /* not a checkout */ }
  const load = os.loadavg().map((l) => l.toFixed(2)).join(', ')
  return `${new Date().toISOString()} · ${os.cpus().length} CPUs · load average ${load} · commit ${commit || 'unknown'}`
}

/**
 * Waits until PostgreSQL has no statement running for anyone but this script: requests autocannon gave up on at the
 * end of a scenario are still being answered, and would otherwise slow the next scenario down.
 */
async function drained(db: ReturnType<typeof connect>, maxSeconds = Number(process.env.LOAD_DRAIN_SECONDS ?? 180)) {
  const end = Date.now() + maxSeconds * 1000
  for (;;) {
    const { rows: [r] } = await sql<{ n: number }>`select count(*)::int as n from pg_stat_activity
      where datname = current_database() and state = 'active' and application_name = ${APP_NAME} and pid <> pg_backend_pid()`.execute(db)
    if (!r?.n) return
    if (Date.now() > end) {
      console.log(`  (${r.n} statements still running after ${maxSeconds} s; going on)`)
      return
    }
    await new Promise((res) => setTimeout(res, 500))
  }
}

const url = process.env.NUXT_DATABASE_URL
if (!url) {
  console.error('NUXT_DATABASE_URL is not set (source .data/<profile>/services.env first).')
  process.exit(1)
}
const db = connect(url, 2)
try {
  const org = await db.selectFrom('organisations').select(['id', 'time_zone']).where('slug', '=', SLUG).executeTakeFirst()
  if (!org) throw new Error('No large organisation: run scripts/seed-large.ts first.')
  const { rows: [size] } = await sql<{ findings: number; work_orders: number; assets: number }>`select
      (select count(*)::int from findings where organisation_id = ${org.id}) as findings,
      (select count(*)::int from work_orders where organisation_id = ${org.id}) as work_orders,
      (select count(*)::int from assets where organisation_id = ${org.id}) as assets`.execute(db)
  if (!size || size.findings < 150_000) throw new Error(`The organisation has ${size?.findings ?? 0} findings; run scripts/seed-large.ts (--replace) first.`)
  const { rows: [{ today }] } = await sql<{ today: string }>`select to_char((now() at time zone ${org.time_zone})::date, 'YYYY-MM-DD') as today`.execute(db) as any
  const daysBefore = (n: number) => new Date(Date.parse(`${today}T00:00:00Z`) - n * 86_400_000).toISOString().slice(0, 10)
  const site = await db.selectFrom('sites').select('id').where('organisation_id', '=', org.id).where('code', '=', 'GF-04990').executeTakeFirstOrThrow()

  // The list's filters: the dashboard's links (open findings of a band, counted findings, recent ones, one site), each
  // at some page. The app and the database get the same rotation.
  const variants: FindingListFilters[] = [
    { open: 'true', band: 2, page: 1, pageSize: 50 },
    { open: 'true', band: 1, page: 3, pageSize: 50 },
    { counted: 'true', band: 3, page: 10, pageSize: 50 },
    { open: 'true', from: daysBefore(90), to: today, page: 2, pageSize: 50 },
    { siteId: site.id, page: 1, pageSize: 50 },
  ]
  const listPath = (f: FindingListFilters) => `/api/orgs/${SLUG}/findings?${new URLSearchParams(Object.entries(f).map(([k, v]) => [k, String(v)])).toString()}`

  // Findings to open: 2 000 spread over the whole organisation.
  const openIds = (await sql<{ id: string }>`select id from (select id, row_number() over (order by created_at, id) as n from findings
      where organisation_id = ${org.id}) x where n % 100 = 0`.execute(db)).rows.map((r) => r.id)
  // Findings to save: those on the owner's surveys in progress or returned (only the assigned thermographer may
  // change them), interleaved by survey so that concurrent saves rarely wait on the same survey's lock.
  const saveRows = (await sql<Record<string, any>>`select f.*, c.asset_id, c.survey_id,
        row_number() over (partition by c.survey_id order by f.created_at, f.id) as nth
      from findings f
      join checks c on c.organisation_id = f.organisation_id and c.id = f.check_id
      join surveys s on s.organisation_id = c.organisation_id and s.id = c.survey_id
      join users u on u.id = s.thermographer_id
      where f.organisation_id = ${org.id} and s.state in ('in_progress', 'returned') and lower(u.email) = ${OWNER.email}
        and f.archived_at is null
      order by nth, c.survey_id`.execute(db)).rows
  const saveQueue = saveRows.map((f) => ({
    id: f.id as string,
    version: f.version as number,
    body: {
      assetId: f.asset_id, component: f.component, phase: f.phase, apparentC: f.apparent_c, referenceC: f.reference_c, ambientC: f.ambient_c,
      emissivity: f.emissivity, reflectedC: f.reflected_c, reflectedMethod: f.reflected_method, distanceM: f.distance_m,
      transmittance: f.transmittance, windowTransmittance: f.window_transmittance, windowC: f.window_c, loadA: f.load_a, ratedA: f.rated_a,
      windMs: f.wind_ms, probableCause: f.probable_cause, causeNotes: f.cause_notes, surfaceId: f.surface_id,
    },
  }))
  const saveById = new Map(saveQueue.map((t) => [t.id, t]))

  console.log(`Load on ${SLUG}: ${size.assets.toLocaleString('en-GB')} assets, ${size.findings.toLocaleString('en-GB')} findings, ${size.work_orders.toLocaleString('en-GB')} work orders`)
  console.log(`${CONNECTIONS} connections, ${SECONDS} s per scenario after ${WARMUP} s of warm-up (not counted); ${machine()}\n`)

  const results: Figures[] = []
  let dbFigures: Figures | undefined
  let dashboardOnce: number | undefined
  const measureDb = async () => {
    // The route's two statements (its page and its total), compiled from the service with the same filters, run by
    // CONNECTIONS clients for as long, each client pairing them as one request does. The clients carry the
    // organisation in greybody.org as the app's do, so row-level security (where present) applies alike.
    const compiled = variants.map((v) => {
      const q = findingListQueries(db as any, org.id, v, org.time_zone)
      return { count: q.count.compile(), rows: q.rows.compile() }
    })
    const pool = new pg.Pool({ connectionString: url, max: CONNECTIONS, options: `-c greybody.org=${org.id}` })
    const clients = await Promise.all(Array.from({ length: CONNECTIONS }, () => pool.connect()))
    const nextQuery = rotate(compiled)
    const drive = async (seconds: number) => {
      const ms: number[] = []
      let errors = 0
      const end = performance.now() + seconds * 1000
      await Promise.all(clients.map(async (c) => {
        while (performance.now() < end) {
          const q = nextQuery()
          const t = performance.now()
          try {
            await c.query(q.count.sql, q.count.parameters as unknown[])
            await c.query(q.rows.sql, q.rows.parameters as unknown[])
            ms.push(performance.now() - t)
          } catch {
            errors++
          }
        }
      }))
      return { ms, errors }
    }
    if (WARMUP > 0) await drive(WARMUP)
    const r = await drive(SECONDS)
    for (const c of clients) c.release()
    await pool.end()
    dbFigures = figures('same SQL straight to PostgreSQL', r.ms, SECONDS, r.errors, 0)
  }

  await withApp(async (baseUrl) => {
    const s = new HttpSession(baseUrl)
    await s.signIn(OWNER.email, OWNER.password)
    const cookie = s.cookieHeader()
    const probe = await s.request('GET', listPath(variants[0]!))
    if (probe.status !== 200) throw new Error(`The findings list answered ${probe.status}: ${probe.text.slice(0, 300)}`)

    type Load = { next: () => AcRequest; onBody?: (status: number, body: string) => void; opts?: Parameters<typeof cannon>[5] }
    const note = (f: Figures) => console.log(`  ${f.name}: p95 ${fmt(f.p95)} ms, ${fmt(f.rps, 0)} req/s, ${f.errors} errors, ${f.non2xx} non-2xx`)
    /** Runs the loads side by side (warm-up first, not counted), each its own autocannon; figures under their names. */
    const run = async (loads: Array<Load & { name: string }>) => {
      if (WARMUP > 0) await Promise.all(loads.map((l) => cannon(baseUrl, cookie, l.next, WARMUP, l.onBody, l.opts)))
      await drained(db)
      const rs = await Promise.all(loads.map((l) => cannon(baseUrl, cookie, l.next, SECONDS, l.onBody, l.opts)))
      rs.forEach((r, i) => {
        const f = figures(loads[i]!.name, r.latencies, SECONDS, r.errors, r.non2xx)
        results.push(f)
        note(f)
      })
      await drained(db)
    }
    const listLoad = (headers?: Record<string, string>): Load => {
      const nextVariant = rotate(variants)
      return { next: () => ({ path: listPath(nextVariant()), headers }) }
    }
    // Saves: a finding is handed to one request at a time and comes back, with its new version, when the answer arrives.
    if (saveQueue.length < CONNECTIONS * 2 && (ONLY.has('save') || ONLY.has('mixed'))) throw new Error(`Only ${saveQueue.length} findings to save on; run scripts/seed-large.ts --replace.`)
    const free = [...saveQueue]
    let saves = 0
    const saveLoad = (opts?: Load['opts']): Load => ({
      opts,
      next: () => {
        const t = free.shift() ?? saveQueue[saves % saveQueue.length]!
        saves++
        return {
          method: 'PATCH',
          path: `/api/orgs/${SLUG}/findings/${t.id}`,
          headers: { 'content-type': 'application/json' },
          body: JSON.stringify({ ...t.body, notes: `Load run save ${saves}.`, version: t.version }),
        }
      },
      onBody: (status, body) => {
        if (status !== 200) return
        try {
          const f = JSON.parse(body) as { id: string; version: number }
          const t = saveById.get(f.id)
          if (t) {
            t.version = f.version
            free.push(t)
          }
        } catch { /* counted by status */ }
      },
    })

    // The list as people get it: a page already computed since the organisation's data last changed is reused
    // (server/utils/org-cache.ts), so after the first request for each of the five filters this measures the reuse.
    if (ONLY.has('list')) await run([{ name: 'findings list (filters, page)', ...listLoad() }])
    // The same list computed on every request (Cache-Control: no-cache): what a page costs when the data has just
    // changed, and what PostgreSQL below is compared with.
    if (ONLY.has('fresh')) await run([{ name: 'findings list, computed each time', ...listLoad({ 'cache-control': 'no-cache' }) }])
    // The same statements straight to PostgreSQL, right after the list so that both meet the same machine.
    if (ONLY.has('db')) {
      await drained(db)
      await measureDb()
      console.log(`  same SQL straight to PostgreSQL: p95 ${fmt(dbFigures!.p95)} ms`)
    }
    // The list while findings are being saved: every save changes the organisation's data, so pages are computed
    // again after each one. LOAD_MIXED_SAVES_PER_S saves a second (2: a field crew of sixty each saving every 30 s).
    if (ONLY.has('mixed')) {
      const rate = Number(process.env.LOAD_MIXED_SAVES_PER_S ?? 2)
      await run([
        { name: `findings list while ${rate} saves/s`, ...listLoad() },
        { name: `  the ${rate} saves/s beside it`, ...saveLoad({ connections: 1, overallRate: rate }) },
      ])
    }
    if (ONLY.has('open')) {
      const nextId = rotate(openIds)
      await run([{ name: 'open a finding', next: () => ({ path: `/api/orgs/${SLUG}/findings/${nextId()}` }) }])
    }
    if (ONLY.has('save')) await run([{ name: 'save a finding (PATCH)', ...saveLoad() }])
    // Last: at this scale one dashboard takes seconds to compute; then it is reused until the data changes.
    if (ONLY.has('dashboard')) {
      await drained(db)
      const t = performance.now()
      const one = await s.request('GET', `/api/orgs/${SLUG}/dashboard`, undefined, false, { 'cache-control': 'no-cache' })
      dashboardOnce = performance.now() - t
      console.log(`  dashboard, computed once: ${fmt(dashboardOnce)} ms (HTTP ${one.status})`)
      await run([{ name: 'dashboard (12 months)', next: () => ({ path: `/api/orgs/${SLUG}/dashboard` }) }])
    }
  })

  console.log('')
  table([...results, ...(dbFigures ? [dbFigures] : [])])
  console.log(`\nAt the end: ${machine()}`)
  if (dashboardOnce !== undefined) console.log(`Dashboard computed once (no-cache): ${fmt(dashboardOnce)} ms`)
  for (const list of results.filter((r) => r.name.startsWith('findings list'))) {
    const ok = list.p95 <= TARGET_LIST_P95_MS && list.errors === 0 && list.non2xx === 0
    console.log(`${ok ? 'PASS' : 'FAIL'}  ${list.name}: p95 ${fmt(list.p95)} ms (target ≤ ${TARGET_LIST_P95_MS} ms), ${list.errors} errors, ${list.non2xx} non-2xx at ${CONNECTIONS} connections`)
    if (dbFigures) {
      const ratio = list.p95 / dbFigures.p95
      console.log(`${ratio <= TARGET_RATIO ? 'PASS' : 'FAIL'}    app ÷ database at p95: ${fmt(list.p95)} ÷ ${fmt(dbFigures.p95)} = ${fmt(ratio, 2)}× (target ≤ ${TARGET_RATIO}×); at p50: ${fmt(list.p50 / dbFigures.p50, 2)}×`)
    }
  }
} finally {
  // Dashboards abandoned at the end of their run go on for minutes on a shared machine: stop what this run started.
  await sql`select pg_cancel_backend(pid) from pg_stat_activity
    where datname = current_database() and state = 'active' and application_name = ${APP_NAME} and pid <> pg_backend_pid()`.execute(db).catch(() => {})
  await db.destroy()
}
