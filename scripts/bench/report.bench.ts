// Survey report (PDF) benchmark: a reviewed survey with 100 findings, each with an infrared and a visible image
// (640 × 480 JPEGs made with sharp, stored in object storage like uploaded ones), reported on through the built
// app over HTTP (request → background worker → PDF in object storage → ready). Target: under 20 s.
// The baseline, measured in the same run: the same report without images (data, layout and fonts only).
//
//   set -a; . .data/dev/services.env; set +a        # or .data/<test profile>/services.env with GREYBODY_TEST_PROFILE
//   npm run db:migrate                               # once (the survey_reports table)
//   node --import tsx scripts/bench/report.bench.ts [runs]
//
// Uses the app at NUXT_APP_URL, or starts the built server itself. Seeds its own organisation (report-bench) once.
import { PutObjectCommand, S3Client } from '@aws-sdk/client-s3'
import bcrypt from 'bcryptjs'
import { sql, type Kysely } from 'kysely'
import sharp from 'sharp'
import { connect } from '../../db/migrator'
import type { Database } from '../../db/database'
import { correctionChain } from '../../shared/thermal/index'
import { findingChainInput, type FindingValues } from '../../shared/schemas/survey'
import { HttpSession, withApp } from './http-session'

const SLUG = 'report-bench'
const OWNER = { email: 'report-bench@greyfield.example', name: 'Bench Manager', password: 'greybody-bench-2026' }
const FINDINGS = 100
const SITES = 10
const ASSETS_PER_SITE = 14
const RUNS = Math.max(1, Number(process.argv[2] ?? 2))
const SURVEY_DAY = '2026-11-20'
const INSTRUMENT = { bandFromUm: 7.5, bandToUm: 14, accuracyK: 2, accuracyPct: 2, ifovMrad: 1.3, calibrationDue: '2027-06-30' }

const env = process.env
const s3 = new S3Client({
  region: env.NUXT_S3_REGION || 'us-east-1', endpoint: env.NUXT_S3_ENDPOINT, forcePathStyle: true,
  credentials: { accessKeyId: env.NUXT_S3_ACCESS_KEY_ID!, secretAccessKey: env.NUXT_S3_SECRET_ACCESS_KEY! },
  requestChecksumCalculation: 'WHEN_REQUIRED', responseChecksumValidation: 'WHEN_REQUIRED',
})
const bucket = env.NUXT_S3_BUCKET || 'greybody'

// Photo-like JPEGs: a smooth gradient with noise compresses like a real 640 × 480 picture (tens of kB), unlike a flat fill.
async function picture(seed: number, kind: 'infrared' | 'visible'): Promise<Buffer> {
  const [a, b] = kind === 'infrared' ? ['#1c1917', '#fb9b06'] : ['#78716c', '#d6d3d1']
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="640" height="480"><defs><radialGradient id="g" cx="${30 + (seed * 7) % 40}%" cy="${40 + (seed * 3) % 30}%" r="60%">
    <stop offset="0" stop-color="${b}"/><stop offset="1" stop-color="${a}"/></radialGradient></defs><rect width="640" height="480" fill="url(#g)"/>
    <rect x="${100 + seed % 200}" y="200" width="220" height="40" fill="${kind === 'infrared' ? '#e35933' : '#44403c'}"/></svg>`
  const base = await sharp(Buffer.from(svg)).raw().toBuffer({ resolveWithObject: true })
  const noise = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#000000', noise: { type: 'gaussian', mean: 0, sigma: 12 } } }).raw().toBuffer()
  const px = base.data
  const ch = base.info.channels
  for (let i = 0, j = 0; i < px.length; i += ch, j += 3) for (let c = 0; c < 3; c++) px[i + c] = Math.max(0, Math.min(255, px[i + c]! + noise[j + c]! - 6))
  return sharp(px, { raw: { width: 640, height: 480, channels: ch } }).jpeg({ quality: 82 }).toBuffer()
}

async function seed(db: Kysely<Database>): Promise<{ orgId: string; surveyId: string; imageBytes: number }> {
  const existing = await db.selectFrom('organisations').select('id').where('slug', '=', SLUG).executeTakeFirst()
  if (existing) {
    const s = await db.selectFrom('surveys').select('id').where('organisation_id', '=', existing.id).where('state', '=', 'reviewed').executeTakeFirst()
    const bytes = await db.selectFrom('attachments').select(sql<string>`coalesce(sum(size_bytes), 0)`.as('n')).where('organisation_id', '=', existing.id).executeTakeFirstOrThrow()
    if (s) return { orgId: existing.id, surveyId: s.id, imageBytes: Number(bytes.n) }
  }
  console.log(`Seeding ${SLUG}: ${SITES} sites, ${SITES * ASSETS_PER_SITE} assets, ${FINDINGS} findings, ${FINDINGS * 2} images…`)
  const pictures = { infrared: [] as Buffer[], visible: [] as Buffer[] }
  for (let i = 0; i < 8; i++) {
    pictures.infrared.push(await picture(i, 'infrared'))
    pictures.visible.push(await picture(i, 'visible'))
  }
  return db.transaction().execute(async (trx) => {
    const user = await trx.selectFrom('users').select('id').where('email', '=', OWNER.email).executeTakeFirst()
      ?? await trx.insertInto('users').values({ email: OWNER.email, name: OWNER.name, password_hash: await bcrypt.hash(OWNER.password, 10) }).returning('id').executeTakeFirstOrThrow()
    const org = existing ?? await trx.insertInto('organisations').values({ slug: SLUG, name: 'Greyfield Bench Utility' } as never).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('memberships').values({ organisation_id: org.id, user_id: user.id, role: 'owner', removed_at: null, qualification: 'ISO 18436-7 category II (bench)' })
      .onConflict((oc) => oc.doNothing()).execute()
    const instrument = await trx.insertInto('instruments').values({
      organisation_id: org.id, make: 'Halden', model: 'T8', serial: 'BENCH-1', band_from_um: 7.5, band_to_um: 14, accuracy_k: 2, accuracy_pct: 2, ifov_mrad: 1.3,
      calibration_due: INSTRUMENT.calibrationDue,
    } as never).returning('id').executeTakeFirstOrThrow()
    const survey = await trx.insertInto('surveys').values({
      organisation_id: org.id, route_id: null, planned_for: SURVEY_DAY, thermographer_id: user.id, instrument_id: instrument.id, state: 'reviewed',
      created_by: user.id, reviewed_by: user.id, started_at: new Date(), submitted_at: new Date(), reviewed_at: new Date(), archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    const assetIds: string[] = []
    for (let s = 0; s < SITES; s++) {
      const site = await trx.insertInto('sites').values({ organisation_id: org.id, code: `RB-${String(s + 1).padStart(2, '0')}`, name: `Bench substation ${s + 1}`, kind: 'substation', latitude: 54 + s / 100, longitude: -2.9 } as never)
        .returning('id').executeTakeFirstOrThrow()
      await trx.insertInto('survey_sites').values({ organisation_id: org.id, survey_id: survey.id, site_id: site.id, position: s, ambient_c: 8, wind_ms: 1.5, humidity_pct: 80, sky: 'overcast', load_notes: 'Winter peak' }).execute()
      for (let a = 0; a < ASSETS_PER_SITE; a++) {
        const asset = await trx.insertInto('assets').values({ organisation_id: org.id, site_id: site.id, label: `BRK-${s + 1}-${a + 1}`, asset_class: 'breaker', rated_current_a: 630 } as never)
          .returning('id').executeTakeFirstOrThrow()
        assetIds.push(asset.id)
      }
    }
    let imageBytes = 0
    for (let i = 0; i < assetIds.length; i++) {
      const outcome = i < FINDINGS ? 'finding' : i % 3 === 0 ? 'not_reached' : 'clear'
      const check = await trx.insertInto('checks').values({
        organisation_id: org.id, survey_id: survey.id, asset_id: assetIds[i]!, outcome, reason: outcome === 'not_reached' ? 'no_access' : null,
        note: outcome === 'not_reached' ? 'Locked compound' : '', checked_by: user.id,
      } as never).returning('id').executeTakeFirstOrThrow()
      if (outcome !== 'finding') continue
      const values = {
        apparentC: 40 + (i * 7) % 60, referenceC: 28, ambientC: 8, emissivity: 0.9, reflectedC: 10, distanceM: 5, loadA: 350 + (i % 5) * 40, ratedA: 630, windMs: 1.5,
      } as FindingValues
      const { reading, options } = findingChainInput(values, INSTRUMENT, { today: SURVEY_DAY })
      const chain = correctionChain(reading, options)
      const finding = await trx.insertInto('findings').values({
        organisation_id: org.id, check_id: check.id, component: `Line-side clamp ${1 + (i % 3)}`, phase: ['A', 'B', 'C'][i % 3]!,
        apparent_c: values.apparentC!, reference_c: 28, ambient_c: 8, emissivity: 0.9, reflected_c: 10, reflected_method: 'reflector', distance_m: 5,
        transmittance: null, window_transmittance: null, window_c: null, load_a: values.loadA!, rated_a: 630, wind_ms: 1.5,
        probable_cause: 'loose_connection', object_c: chain.hotObjectK - 273.15,
        rise_over_reference_k: chain.measured.overReferenceK ?? null, rise_over_ambient_k: chain.measured.overAmbientK ?? null,
        load_scaled_rise_k: chain.ranked.overReferenceK ?? null, band: chain.rank.band, band_basis: chain.rank.basis, action: chain.rank.action,
        repair_deadline_days: chain.rank.repairDeadlineDays, uncertainty_low_c: chain.hotInterval ? chain.hotInterval.low - 273.15 : null,
        uncertainty_high_c: chain.hotInterval ? chain.hotInterval.high - 273.15 : null, warnings: JSON.stringify(chain.warnings),
        criteria_id: chain.rank.criteriaId, criteria_version: chain.rank.criteriaVersion,
      } as never).returning('id').executeTakeFirstOrThrow()
      for (const kind of ['infrared', 'visible'] as const) {
        const bytes = pictures[kind][i % 8]!
        const key = `orgs/${org.id}/findings/${finding.id}/bench-${kind}.jpg`
        await s3.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: bytes, ContentType: 'image/jpeg' }))
        imageBytes += bytes.length
        await trx.insertInto('attachments').values({
          organisation_id: org.id, subject_kind: 'finding', subject_id: finding.id, kind, file_name: `bench-${i + 1}-${kind}.jpg`, content_type: 'image/jpeg',
          size_bytes: bytes.length, object_key: key, thumbnail_key: null, state: 'stored', refused_reason: null, uploaded_by: user.id, stored_at: new Date(), archived_at: null,
        }).execute()
      }
    }
    return { orgId: org.id, surveyId: survey.id, imageBytes }
  })
}

interface Run { wallMs: number; workerMs: number; sizeBytes: number; pages: number; images: number }

// A kept-alive connection the server has just closed answers ECONNRESET before the request is read: send it again once.
async function send(s: HttpSession, method: string, path: string, body?: unknown) {
  try {
    return await s.request(method, path, body)
  } catch (e) {
    if ((e as { cause?: { code?: string } }).cause?.code !== 'ECONNRESET') throw e
    return s.request(method, path, body)
  }
}

async function reportOnce(s: HttpSession, db: Kysely<Database>, surveyId: string, includeImages: boolean): Promise<Run> {
  const t = performance.now()
  const res = await send(s, 'POST', `/api/orgs/${SLUG}/surveys/${surveyId}/reports`, { includeImages })
  if (res.status !== 202) throw new Error(`request: ${res.status} ${res.text.slice(0, 300)}`)
  const id = res.json().id
  for (;;) {
    const r = (await send(s, 'GET', `/api/orgs/${SLUG}/reports/${id}`)).json()
    if (r.state === 'failed') throw new Error(`report failed: ${r.error}`)
    if (r.state === 'ready') {
      const wallMs = performance.now() - t
      const row = await db.selectFrom('survey_reports').select(['started_at', 'finished_at']).where('id', '=', id).executeTakeFirstOrThrow()
      return { wallMs, workerMs: row.finished_at!.getTime() - row.started_at!.getTime(), sizeBytes: r.sizeBytes, pages: r.pageCount, images: r.imageCount }
    }
    await new Promise((r) => setTimeout(r, 100))
  }
}

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MB`
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`

const db = connect<Database>(env.NUXT_DATABASE_URL!, 2)
try {
  const { surveyId, imageBytes } = await seed(db)
  await withApp(async (baseUrl) => {
    const session = new HttpSession(baseUrl)
    await session.signIn(OWNER.email, OWNER.password)
    const results: Record<'with' | 'without', Run[]> = { with: [], without: [] }
    // Alternate the two kinds so that load from other work on the machine falls on both alike.
    for (let i = 0; i < RUNS; i++) {
      results.without.push(await reportOnce(session, db, surveyId, false))
      results.with.push(await reportOnce(session, db, surveyId, true))
    }
    const line = (name: string, runs: Run[]) => {
      const best = runs.reduce((a, b) => (a.wallMs < b.wallMs ? a : b))
      console.log(`${name.padEnd(34)} request→ready ${runs.map((r) => s(r.wallMs)).join(' / ')} (best ${s(best.wallMs)}; worker ${s(best.workerMs)})  ` +
        `${mb(best.sizeBytes)}, ${best.pages} pages, ${best.images} images`)
      return best
    }
    console.log(`\nSurvey report, ${FINDINGS} findings (${mb(imageBytes)} of 640 × 480 JPEGs in object storage), ${RUNS} run(s) each:`)
    line('baseline: without images', results.without)
    const best = line('report with images', results.with)
    console.log(`\nTarget: under 20 s for ${FINDINGS} findings with images → ${best.wallMs < 20_000 ? 'met' : 'NOT met'} (${s(best.wallMs)}).`)
  })
} finally {
  await db.destroy()
}
