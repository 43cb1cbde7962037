// Times a 50 000-row asset import through the API the import page uses: the upload in pieces (each parsed and
// validated as it arrives), the whole-file check, and the one-transaction commit. Needs the large organisation
// (scripts/seed-large.ts); the imported rows are archived-free additions and are removed again at the end.
//
//   set -a; . .data/dev/services.env; set +a
//   node --import tsx scripts/bench/register-import.bench.ts [rows]
import { sql } from 'kysely'
import { connect } from '../../db/migrator'
import { splitCsv } from '../../shared/csv'
import { HttpSession, withApp } from './http-session'

const SLUG = 'greyfield-large'
const ROWS = Number(process.argv[2] ?? 50_000)
const PIECE_CHARS = 256 * 1024 // as composables/useRegisterImport.ts

const header = 'site_code,label,asset_class,manufacturer,model,voltage_kv,rated_current_a,criticality,condition,components,interval_months\r\n'
const lines = Array.from({ length: ROWS }, (_, i) => {
  const site = `GF-${String((i % 5000) + 1).padStart(5, '0')}`
  return `${site},IMP-${String(i).padStart(6, '0')},breaker,"Bench Apparatus, Ltd",BX-${i % 97},33,${400 + (i % 9) * 100},${(i % 5) + 1},${(i % 3) + 1},A;B;C,\r\n`
})
const text = header + lines.join('')

await withApp(async (baseUrl) => {
  const s = new HttpSession(baseUrl)
  await s.signIn('large-owner@greyfield.example', 'greybody-large-2026')
  const t0 = performance.now()
  const created = (await s.request('POST', `/api/orgs/${SLUG}/register-imports`, { kind: 'assets', fileName: 'bench.csv', totalChars: text.length })).json()
  const pieces = splitCsv(text, PIECE_CHARS)
  const pieceMs: number[] = []
  for (const [seq, piece] of pieces.entries()) {
    const p0 = performance.now()
    const res = await s.request('POST', `/api/orgs/${SLUG}/register-imports/${created.id}/chunks`, { seq, text: piece })
    if (res.status !== 200) throw new Error(`piece ${seq}: ${res.status} ${res.text}`)
    pieceMs.push(performance.now() - p0)
  }
  const t1 = performance.now()
  const check = await s.request('POST', `/api/orgs/${SLUG}/register-imports/${created.id}/check`)
  const t2 = performance.now()
  const summary = check.json()
  if (!summary.ready) throw new Error(`not ready: ${JSON.stringify(summary.problems.slice(0, 5))}`)
  const commit = await s.request('POST', `/api/orgs/${SLUG}/register-imports/${created.id}/commit`)
  const t3 = performance.now()
  if (commit.status !== 200) throw new Error(`commit: ${commit.status} ${commit.text}`)

  const mb = (text.length / 1e6).toFixed(1)
  console.log(`Import of ${ROWS.toLocaleString('en-GB')} asset rows (${mb} M characters, ${pieces.length} pieces of ≤ ${PIECE_CHARS / 1024} K):`)
  console.log(`  upload + row validation ${((t1 - t0) / 1000).toFixed(1)} s  (per piece: max ${Math.max(...pieceMs).toFixed(0)} ms)`)
  console.log(`  whole-file check        ${((t2 - t1) / 1000).toFixed(1)} s`)
  console.log(`  commit (one transaction) ${((t3 - t2) / 1000).toFixed(1)} s — ${commit.json().insertedCount.toLocaleString('en-GB')} rows written`)
  console.log(`  total                   ${((t3 - t0) / 1000).toFixed(1)} s`)

  const db = connect(process.env.NUXT_DATABASE_URL!, 1)
  try {
    await sql`delete from assets where label like 'IMP-%' and organisation_id = (select id from organisations where slug = ${SLUG})`.execute(db)
  } finally {
    await db.destroy()
  }
})
