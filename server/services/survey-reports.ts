import { sql } from 'kysely'
import sharp from 'sharp'
import type { SurveyReportRow } from '~~/db/tables/survey-reports'
import { correctionChain, criteriaSetById, type ChainStep } from '#shared/thermal/index'
import { findingChainInput, NOT_REACHED_LABELS, PROBABLE_CAUSE_LABELS, SURVEY_STATE_LABELS, type FindingValues } from '#shared/schemas/survey'
import { ASSET_CLASS_LABELS } from '#shared/register'
import { REPORT_WORK_ORDER_STATE_LABELS, reportFileName } from '#shared/report'
import type { SurveyReportDownload, SurveyReportItem } from '#shared/types/report'
import type { z } from 'zod'
import type { reportRequestSchema } from '#shared/schemas/report'
import { num } from './paging'
import { renderSurveyReport, type ReportData, type ReportFinding, type ReportFonts, type ReportImage, type ReportSite } from './report-pdf'

// Survey reports: requested by a person, made by a worker in the app process (server/plugins/report-worker.ts),
// stored in object storage under the organisation's prefix, downloaded later through a short-lived link.

type Db = ReturnType<typeof useDb>

/** A running job whose heartbeat is older than this is taken to be orphaned (its instance stopped) and taken over. */
const STALE_AFTER_SECONDS = 120
const MAX_ATTEMPTS = 3
/** Findings whose images are fetched ahead of the one being drawn. */
const PREFETCH = 12

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

function toItem(r: SurveyReportRow & { requester_name: string | null; planned_for: string }, orgSlug: string): SurveyReportItem {
  return {
    id: r.id,
    surveyId: r.survey_id,
    state: r.state,
    progress: r.progress,
    includeImages: r.include_images,
    sizeBytes: r.size_bytes === null ? null : Number(r.size_bytes),
    pageCount: r.page_count,
    findingCount: r.finding_count,
    imageCount: r.image_count,
    error: r.error,
    requestedBy: r.requested_by ? { id: r.requested_by, name: r.requester_name ?? '—' } : null,
    createdAt: r.created_at.toISOString(),
    startedAt: r.started_at?.toISOString() ?? null,
    finishedAt: r.finished_at?.toISOString() ?? null,
    fileName: reportFileName(orgSlug, r.planned_for, r.id),
    downloadPath: r.state === 'ready' ? `/api/orgs/${orgSlug}/reports/${r.id}/download` : null,
  }
}

function reportQuery(db: Db, orgId: string) {
  // Tenant condition inside the WHERE: a report id of another organisation is simply not found.
  return db.selectFrom('survey_reports as r')
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'r.organisation_id').onRef('s.id', '=', 'r.survey_id'))
    .leftJoin('users as u', 'u.id', 'r.requested_by')
    .selectAll('r')
    .select('u.name as requester_name')
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
    .where('r.organisation_id', '=', orgId)
}

async function surveyForReport(db: Db, orgId: string, surveyId: string) {
  const s = await db.selectFrom('surveys').select(['id', 'state'])
    .where('organisation_id', '=', orgId).where('id', '=', surveyId).where('archived_at', 'is', null).executeTakeFirst()
  if (!s) throw notFound('Survey')
  return s
}

/** Queues a report of a reviewed survey; the worker picks it up at once on this instance, or within seconds on another. */
export async function requestReport(c: MemberContext, surveyId: string, input: z.output<typeof reportRequestSchema>): Promise<SurveyReportItem> {
  const db = useDb()
  const s = await surveyForReport(db, c.org.id, surveyId)
  // A report speaks for the organisation: only a survey a manager has reviewed is reported on.
  if (s.state !== 'reviewed') {
    conflict(`Only a reviewed survey can be reported on. This survey is “${SURVEY_STATE_LABELS[s.state].toLowerCase()}”: review it first.`)
  }
  const row = await db.insertInto('survey_reports').values({
    organisation_id: c.org.id, survey_id: surveyId, include_images: input.includeImages, requested_by: c.user.id,
    object_key: null, size_bytes: null, page_count: null, finding_count: null, image_count: null, error: null,
    started_at: null, heartbeat_at: null, finished_at: null,
  }).returning('id').executeTakeFirstOrThrow()
  kickReportWorker()
  return getReport(c, row.id)
}

/** The reports of one survey, newest first (a survey has a handful; capped at the last 50). */
export async function listReports(c: MemberContext, surveyId: string): Promise<SurveyReportItem[]> {
  const db = useDb()
  await surveyForReport(db, c.org.id, surveyId)
  const rows = await reportQuery(db, c.org.id).where('r.survey_id', '=', surveyId)
    .orderBy('r.created_at', 'desc').orderBy('r.id').limit(50).execute()
  return rows.map((r) => toItem(r, c.org.slug))
}

/** One report and its progress; 404 when it is not this organisation's. */
export async function getReport(c: MemberContext, id: string): Promise<SurveyReportItem> {
  const row = await reportQuery(useDb(), c.org.id).where('r.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Report')
  return toItem(row, c.org.slug)
}

/** A short-lived link to a ready report's file, saved under a readable name. */
export async function reportDownload(c: MemberContext, id: string): Promise<SurveyReportDownload> {
  const report = await reportQuery(useDb(), c.org.id).where('r.id', '=', id).executeTakeFirst()
  if (!report) throw notFound('Report')
  if (report.state !== 'ready' || !report.object_key) conflict('This report is not ready yet. Wait for it to finish, then download it.')
  const fileName = reportFileName(c.org.slug, report.planned_for, report.id)
  const expiresInSeconds = 300
  return { url: await presignGet(report.object_key, { downloadName: fileName, expiresIn: expiresInSeconds }), fileName, expiresInSeconds }
}

// ---- The worker ----------------------------------------------------------------------------------------------

let busy = false
let lastError = ''

/** Starts working through queued reports on this instance unless it is already doing so. */
export function kickReportWorker(): void {
  if (busy) return
  busy = true
  // A request may kick the worker, but the queue spans organisations: it works past the tenant wall, not as the request.
  void runAsSystem(async () => {
    try {
      for (;;) {
        const job = await claimNextReport()
        if (!job) break
        await runReport(job)
      }
    } catch (e) {
      // Before migrations, or with the database away: say so once, then keep quiet until it changes.
      const msg = e instanceof Error ? e.message : String(e)
      if (msg !== lastError) console.error('[reports] worker:', msg)
      lastError = msg
    } finally {
      busy = false
    }
  })
}

/**
 * Takes the oldest waiting job. `for update skip locked` lets several app instances poll the same queue without
 * making one report twice. The queue spans organisations on purpose: this is the system's worker, not a request,
 * and every query it runs for the job carries the job's own organisation_id.
 */
export async function claimNextReport(): Promise<SurveyReportRow | null> {
  const db = useDb()
  // Jobs that failed too often are closed first, so a report that crashes its instance cannot loop forever.
  await db.updateTable('survey_reports')
    .set({ state: 'failed', error: 'The report could not be made after several attempts.', finished_at: new Date() })
    .where('state', '=', 'running').where('attempts', '>=', MAX_ATTEMPTS)
    .where('heartbeat_at', '<', sql<Date>`now() - make_interval(secs => ${STALE_AFTER_SECONDS})`)
    .execute()
  const { rows } = await sql<SurveyReportRow>`
    update survey_reports set state = 'running', progress = 0, attempts = attempts + 1, started_at = now(), heartbeat_at = now()
    where id = (
      select id from survey_reports
      where state = 'queued' or (state = 'running' and attempts < ${MAX_ATTEMPTS} and heartbeat_at < now() - make_interval(secs => ${STALE_AFTER_SECONDS}))
      order by created_at
      for update skip locked
      limit 1
    )
    returning *`.execute(db)
  return rows[0] ?? null
}

async function setProgress(job: SurveyReportRow, progress: number) {
  await useDb().updateTable('survey_reports').set({ progress: Math.max(0, Math.min(99, Math.round(progress))), heartbeat_at: new Date() })
    .where('organisation_id', '=', job.organisation_id).where('id', '=', job.id).where('state', '=', 'running').execute()
}

/** Makes one claimed report: loads the survey, draws the PDF, stores it, marks it ready (or failed with the reason). */
export async function runReport(job: SurveyReportRow): Promise<void> {
  const db = useDb()
  try {
    const { data, images } = await loadReportData(job)
    await setProgress(job, 5)
    const fonts = await loadReportFonts()
    let last = Date.now()
    const result = await renderSurveyReport(data, fonts, images, async (done) => {
      // Progress at most every 250 ms: the bar moves smoothly without a write per finding on large surveys.
      if (Date.now() - last < 250 && done < 1) return
      last = Date.now()
      await setProgress(job, 5 + done * 90)
    })
    const key = tenantKey(job.organisation_id, 'reports', job.survey_id, `${job.id}.pdf`)
    await putObject(key, result.pdf, 'application/pdf')
    await db.updateTable('survey_reports').set({
      state: 'ready', progress: 100, object_key: key, size_bytes: result.pdf.length, page_count: result.pages,
      finding_count: data.findings.length, image_count: result.images, error: null, finished_at: new Date(), heartbeat_at: new Date(),
    }).where('organisation_id', '=', job.organisation_id).where('id', '=', job.id).execute()
  } catch (e) {
    console.error(`[reports] report ${job.id} failed:`, e)
    const message = e instanceof Error ? e.message : String(e)
    await db.updateTable('survey_reports').set({
      state: 'failed', error: `The report could not be made (${message.slice(0, 300)}). Try again; if it fails again, tell your administrator.`,
      finished_at: new Date(),
    }).where('organisation_id', '=', job.organisation_id).where('id', '=', job.id).execute()
  }
}

let fontCache: Promise<ReportFonts> | null = null

/** Manrope WOFF files shipped with the app as Nitro server assets (server/assets/fonts), read once per process. */
export function loadReportFonts(): Promise<ReportFonts> {
  fontCache ??= (async () => {
    const storage = useStorage('assets:server')
    const read = async (name: string) => {
      const raw = await storage.getItemRaw<Uint8Array>(`fonts:${name}`)
      if (!raw) throw new Error(`Font ${name} is missing from the build.`)
      return new Uint8Array(raw)
    }
    const pair = async (subset: string) => ({ regular: await read(`manrope-${subset}-400-normal.woff`), bold: await read(`manrope-${subset}-700-normal.woff`) })
    return { latin: await pair('latin'), latinExt: await pair('latin-ext'), greek: await pair('greek') }
  })().catch((e) => {
    fontCache = null
    throw e
  })
  return fontCache
}

const date = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : null)
const dateTime = (d: Date | null) => (d ? `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC` : null)
const undef = <T>(v: T | null): T | undefined => (v === null ? undefined : v)

function addDays(day: string, days: number): string {
  const d = new Date(`${day}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() + days)
  return d.toISOString().slice(0, 10)
}

// An image as the PDF wants it: JPEGs of sensible size go in as they are (no decoding at all); PNGs and large JPEGs
// are made into a JPEG no wider than 1600 px (PNG with transparency is slow to embed, and large files bloat the PDF).
async function prepareImage(bytes: Uint8Array, contentType: string): Promise<Uint8Array> {
  // The attachments service checked the type by content when the upload completed; the JPEG magic is checked again.
  const isJpeg = contentType === 'image/jpeg' && bytes[0] === 0xff && bytes[1] === 0xd8
  if (isJpeg && bytes.length <= 1.5 * 1024 * 1024) return bytes
  return new Uint8Array(await sharp(bytes).rotate().resize({ width: 1600, height: 1600, fit: 'inside', withoutEnlargement: true })
    .flatten({ background: '#ffffff' }).jpeg({ quality: 82 }).toBuffer())
}

/** Everything the report prints, read with the job's organisation inside every query. */
export async function loadReportData(job: SurveyReportRow): Promise<{ data: ReportData; images: (i: number) => Promise<ReportImage[]> }> {
  const db = useDb()
  const orgId = job.organisation_id
  const survey = await db.selectFrom('surveys as s')
    .innerJoin('organisations as o', 'o.id', 's.organisation_id')
    .innerJoin('users as t', 't.id', 's.thermographer_id')
    .innerJoin('memberships as m', (j) => j.onRef('m.organisation_id', '=', 's.organisation_id').onRef('m.user_id', '=', 's.thermographer_id'))
    .innerJoin('instruments as i', (j) => j.onRef('i.organisation_id', '=', 's.organisation_id').onRef('i.id', '=', 's.instrument_id'))
    .leftJoin('routes as r', (j) => j.onRef('r.organisation_id', '=', 's.organisation_id').onRef('r.id', '=', 's.route_id'))
    .leftJoin('users as rv', 'rv.id', 's.reviewed_by')
    .select([
      's.id', 's.state', 's.started_at', 's.submitted_at', 's.reviewed_at', 's.review_comments', 'o.name as org_name', 't.name as thermographer_name',
      'm.qualification', 'i.make', 'i.model', 'i.serial', 'i.band_from_um', 'i.band_to_um', 'i.accuracy_k', 'i.accuracy_pct', 'i.ifov_mrad',
      'r.name as route_name', 'rv.name as reviewer_name',
      'o.repair_days_band1', 'o.repair_days_band2', 'o.repair_days_band3', 'o.repair_days_band4',
    ])
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('planned_for'))
    .select(sql<string | null>`to_char(i.calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .where('s.organisation_id', '=', orgId).where('s.id', '=', job.survey_id)
    .executeTakeFirst()
  if (!survey) throw new Error('The survey is gone.')
  const requester = job.requested_by
    ? await db.selectFrom('users').select(['name', 'temperature_unit', 'length_unit']).where('id', '=', job.requested_by).executeTakeFirst()
    : undefined

  const [sites, assets, checks, findings] = await Promise.all([
    db.selectFrom('survey_sites as ss')
      .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'ss.organisation_id').onRef('si.id', '=', 'ss.site_id'))
      .select(['ss.site_id', 'si.code', 'si.name', 'si.safety_notes', 'ss.ambient_c', 'ss.wind_ms', 'ss.humidity_pct', 'ss.sky', 'ss.load_notes'])
      .where('ss.organisation_id', '=', orgId).where('ss.survey_id', '=', job.survey_id).orderBy('ss.position').execute(),
    db.selectFrom('survey_sites as ss')
      .innerJoin('assets as a', (j) => j.onRef('a.organisation_id', '=', 'ss.organisation_id').onRef('a.site_id', '=', 'ss.site_id'))
      .select(['a.id', 'a.site_id', 'a.label', 'a.asset_class'])
      .where('ss.organisation_id', '=', orgId).where('ss.survey_id', '=', job.survey_id).where('a.archived_at', 'is', null)
      .orderBy('a.label').orderBy('a.id').execute(),
    db.selectFrom('checks').select(['id', 'asset_id', 'outcome', 'reason', 'note'])
      .where('organisation_id', '=', orgId).where('survey_id', '=', job.survey_id).execute(),
    db.selectFrom('findings as f')
      .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
      .selectAll('f').select('c.asset_id')
      .where('f.organisation_id', '=', orgId).where('c.survey_id', '=', job.survey_id).where('f.archived_at', 'is', null)
      .orderBy('f.created_at').orderBy('f.id').execute(),
  ])
  const findingIds = findings.map((f) => f.id)
  const [workOrders, attachments] = await Promise.all([
    findingIds.length
      ? db.selectFrom('work_order_findings as wf')
        .innerJoin('work_orders as w', (j) => j.onRef('w.organisation_id', '=', 'wf.organisation_id').onRef('w.id', '=', 'wf.work_order_id'))
        .select(['wf.finding_id', 'w.number', 'w.state', 'w.created_at'])
        .select(sql<string | null>`to_char(w.due_on, 'YYYY-MM-DD')`.as('due_on'))
        .where('wf.organisation_id', '=', orgId).where('wf.finding_id', 'in', findingIds).where('w.archived_at', 'is', null)
        .orderBy('w.created_at', 'asc').execute()
      : Promise.resolve([]),
    findingIds.length
      ? db.selectFrom('attachments').select(['subject_id', 'kind', 'object_key', 'content_type', 'file_name'])
        .where('organisation_id', '=', orgId).where('subject_kind', '=', 'finding').where('subject_id', 'in', findingIds)
        .where('state', '=', 'stored').where('archived_at', 'is', null).where('kind', 'in', ['infrared', 'visible'])
        .orderBy('created_at').orderBy('id').execute()
      : Promise.resolve([]),
  ])
  // The latest work order of each finding wins (an earlier one may have been cancelled and raised again).
  const woByFinding = new Map(workOrders.map((w) => [w.finding_id, w]))
  const attByFinding = new Map<string, typeof attachments>()
  for (const a of attachments) attByFinding.set(a.subject_id, [...(attByFinding.get(a.subject_id) ?? []), a])

  const siteById = new Map(sites.map((s) => [s.site_id, s]))
  const assetById = new Map(assets.map((a) => [a.id, a]))
  const bandDays: Record<number, number | null> = { 1: survey.repair_days_band1, 2: survey.repair_days_band2, 3: survey.repair_days_band3, 4: survey.repair_days_band4 }
  const instrument = {
    bandFromUm: Number(survey.band_from_um), bandToUm: Number(survey.band_to_um), accuracyK: num(survey.accuracy_k),
    accuracyPct: num(survey.accuracy_pct), ifovMrad: num(survey.ifov_mrad), calibrationDue: survey.calibration_due,
  }
  const criteriaNames = new Set<string>()
  const numberById = new Map<string, number>()
  const outFindings: ReportFinding[] = findings.map((f, idx) => {
    numberById.set(f.id, idx + 1)
    const asset = assetById.get(f.asset_id)
    const site = asset ? siteById.get(asset.site_id) : undefined
    const criteria = criteriaSetById(f.criteria_id)
    const criteriaLabel = `${criteria.name} (version ${f.criteria_version})`
    criteriaNames.add(criteriaLabel)
    let chain: ChainStep[] | null = null
    try {
      const values = {
        apparentC: f.apparent_c, referenceC: undef(f.reference_c), ambientC: undef(f.ambient_c), emissivity: f.emissivity, reflectedC: f.reflected_c,
        distanceM: undef(f.distance_m), transmittance: undef(f.transmittance), windowTransmittance: undef(f.window_transmittance), windowC: undef(f.window_c),
        loadA: undef(f.load_a), ratedA: undef(f.rated_a), windMs: undef(f.wind_ms),
      } as FindingValues
      const { reading, options } = findingChainInput(values, instrument, { criteriaId: f.criteria_id, today: survey.planned_for })
      chain = correctionChain(reading, options).steps
    } catch {
      chain = null
    }
    const effective = f.reviewed_band ?? f.band
    // A band changed on review takes that band's action and the organisation's deadline for it.
    const reviewedAction = f.reviewed_band !== null
      ? (criteria.overReference ?? criteria.overAmbient)?.bands.find((b) => b.band === f.reviewed_band)?.action ?? f.action
      : f.action
    const days = effective === null ? null : f.reviewed_band !== null ? (bandDays[effective] ?? null) : f.repair_deadline_days
    const wo = woByFinding.get(f.id)
    const atts = attByFinding.get(f.id) ?? []
    return {
      number: idx + 1,
      id: f.id,
      site: site ? `${site.code} ${site.name}` : '—',
      assetLabel: asset?.label ?? '—',
      assetClass: asset ? (ASSET_CLASS_LABELS[asset.asset_class as keyof typeof ASSET_CLASS_LABELS] ?? asset.asset_class) : '—',
      component: f.component,
      phase: f.phase,
      inputs: {
        apparentC: f.apparent_c, referenceC: f.reference_c, ambientC: f.ambient_c, emissivity: f.emissivity, reflectedC: f.reflected_c,
        reflectedMethod: f.reflected_method, distanceM: f.distance_m, transmittance: f.transmittance, windowTransmittance: f.window_transmittance,
        windowC: f.window_c, loadA: f.load_a, ratedA: f.rated_a, windMs: f.wind_ms,
      },
      chain,
      objectC: f.object_c,
      intervalC: f.uncertainty_low_c !== null && f.uncertainty_high_c !== null ? { low: f.uncertainty_low_c, high: f.uncertainty_high_c } : null,
      riseOverReferenceK: f.rise_over_reference_k,
      riseOverAmbientK: f.rise_over_ambient_k,
      loadScaledRiseK: f.load_scaled_rise_k,
      band: f.band,
      bandBasis: f.band_basis,
      reviewedBand: f.reviewed_band,
      reviewReason: f.review_reason,
      action: reviewedAction,
      repairDeadlineDays: days,
      repairBy: days === null ? null : addDays(survey.planned_for, days),
      probableCause: PROBABLE_CAUSE_LABELS[f.probable_cause as keyof typeof PROBABLE_CAUSE_LABELS] ?? f.probable_cause,
      causeNotes: f.cause_notes,
      notes: f.notes,
      warnings: ((f.warnings ?? []) as Array<{ severity: string; message: string }>).map((w) => ({ severity: w.severity, message: w.message })),
      criteria: criteriaLabel,
      workOrder: wo ? { number: wo.number, state: wo.state, stateLabel: REPORT_WORK_ORDER_STATE_LABELS[wo.state] ?? wo.state, dueOn: wo.due_on } : null,
      imageCount: atts.length,
    }
  })

  const checkByAsset = new Map(checks.map((c) => [c.asset_id, c]))
  const findingNumbersByAsset = new Map<string, number[]>()
  for (const f of findings) findingNumbersByAsset.set(f.asset_id, [...(findingNumbersByAsset.get(f.asset_id) ?? []), numberById.get(f.id)!])
  const counts = { assets: 0, clear: 0, finding: 0, notReached: 0, unchecked: 0 }
  const outSites: ReportSite[] = sites.map((s) => ({
    code: s.code,
    name: s.name,
    safetyNotes: s.safety_notes ?? '',
    conditions: { ambientC: num(s.ambient_c), windMs: num(s.wind_ms), humidityPct: num(s.humidity_pct), sky: s.sky, loadNotes: s.load_notes },
    assets: assets.filter((a) => a.site_id === s.site_id).map((a) => {
      const c = checkByAsset.get(a.id)
      counts.assets++
      const outcome = c ? c.outcome : 'unchecked'
      if (outcome === 'clear') counts.clear++
      else if (outcome === 'finding') counts.finding++
      else if (outcome === 'not_reached') counts.notReached++
      else counts.unchecked++
      return {
        label: a.label,
        assetClass: ASSET_CLASS_LABELS[a.asset_class as keyof typeof ASSET_CLASS_LABELS] ?? a.asset_class,
        outcome,
        reason: c?.reason ? NOT_REACHED_LABELS[c.reason as keyof typeof NOT_REACHED_LABELS] ?? c.reason : null,
        note: c?.note ?? '',
        findingNumbers: findingNumbersByAsset.get(a.id) ?? [],
      }
    }),
  }))

  const accuracy = [survey.accuracy_k !== null ? `±${num(survey.accuracy_k)} K` : null, survey.accuracy_pct !== null ? `±${num(survey.accuracy_pct)} %` : null]
    .filter(Boolean).join(' or ')
  const data: ReportData = {
    reportId: job.id,
    organisation: survey.org_name,
    survey: {
      id: survey.id, plannedFor: survey.planned_for, startedAt: dateTime(survey.started_at), submittedAt: dateTime(survey.submitted_at),
      reviewedAt: date(survey.reviewed_at), reviewedBy: survey.reviewer_name, reviewComments: survey.review_comments, routeName: survey.route_name,
    },
    thermographer: { name: survey.thermographer_name, qualification: survey.qualification },
    instrument: {
      label: `${survey.make} ${survey.model}, serial ${survey.serial}`,
      band: `${num(survey.band_from_um)}–${num(survey.band_to_um)} µm`,
      accuracy: accuracy ? `${accuracy} (whichever is greater)` : 'Not recorded',
      ifovMrad: num(survey.ifov_mrad),
      calibrationDue: survey.calibration_due,
      calibrationOverdue: survey.calibration_due !== null && survey.calibration_due < survey.planned_for,
    },
    criteria: [...criteriaNames],
    sites: outSites,
    findings: outFindings,
    counts,
    generatedAt: dateTime(new Date())!,
    generatedBy: requester?.name ?? '—',
    units: { temperature: requester?.temperature_unit ?? 'C', length: requester?.length_unit ?? 'm' },
    includeImages: job.include_images,
  }

  // Images are fetched a few findings ahead of the page being drawn, so storage and drawing overlap.
  const cache = new Map<number, Promise<ReportImage[]>>()
  const fetchImages = (i: number): Promise<ReportImage[]> => {
    if (i >= findings.length) return Promise.resolve([])
    let p = cache.get(i)
    if (!p) {
      const atts = attByFinding.get(findings[i]!.id) ?? []
      const first = (['infrared', 'visible'] as const).map((k) => atts.find((a) => a.kind === k)).filter((a) => a !== undefined)
      p = Promise.all(first.map(async (a) => {
        const bytes = await getObjectBytes(a.object_key)
        if (!bytes) return null
        return { kind: a.kind as 'infrared' | 'visible', fileName: a.file_name, data: await prepareImage(bytes, a.content_type) }
      })).then((list) => list.filter((x) => x !== null))
      cache.set(i, p)
    }
    return p
  }
  const images = (i: number) => {
    for (let k = i + 1; k <= i + PREFETCH; k++) void fetchImages(k).catch(() => {})
    const p = fetchImages(i)
    cache.delete(i)
    return p
  }
  return { data, images }
}
