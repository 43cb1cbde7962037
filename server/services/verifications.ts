// Verifications: the re-scan of a repaired finding's component. The reading goes through the same engine, on the
// server, as a finding does (recordFinding in surveys.ts); below the lowest band the finding closes as verified,
// otherwise the work order goes back to open with the new reading attached.
import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '~~/db/database'
import type { VerificationRow } from '~~/db/tables/verifications'
import { can, type Role } from '#shared/permissions'
import type { FindingValues } from '#shared/schemas/survey'
import type { verificationAssignSchema, verificationListQuerySchema, verificationReadingSchema } from '#shared/schemas/work-order'
import type { Page } from '#shared/types/programme'
import type { VerificationItem } from '#shared/types/work-order'
import { workOrderReference } from '#shared/work-orders'
import { changedMeanwhile, num, pageWindow } from './paging'
import { computedColumns, engineInstrumentQuery, readingColumns, serverChain } from './finding-parts'
import { recordEvent } from './record-events'
import { closeWorkOrder, findingQuery, lockWorkOrder, readingOf, reopenWorkOrder, workOrderSettings, type LockedWorkOrder } from './work-orders'

type Db = ReturnType<typeof useDb> | Transaction<Database>

function conflict(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Conflict', data: { message } })
}

function verificationQuery(db: Db, orgId: string) {
  return db.selectFrom('verifications as v')
    .innerJoin('work_orders as w', (j) => j.onRef('w.organisation_id', '=', 'v.organisation_id').onRef('w.id', '=', 'v.work_order_id'))
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'v.organisation_id').onRef('si.id', '=', 'v.site_id'))
    .leftJoin('users as t', 't.id', 'v.thermographer_id')
    .leftJoin('users as rb', 'rb.id', 'v.recorded_by')
    .leftJoin('instruments as i', (j) => j.onRef('i.organisation_id', '=', 'v.organisation_id').onRef('i.id', '=', 'v.instrument_id'))
    .selectAll('v')
    .select(['w.number as wo_number', 'w.title as wo_title', 'w.state as wo_state', 'si.code as site_code', 'si.name as site_name', 'si.latitude', 'si.longitude',
      't.name as thermographer_name', 'rb.name as recorded_by_name', 'i.make', 'i.model', 'i.serial'])
    .where('v.organisation_id', '=', orgId)
    .where('w.archived_at', 'is', null)
}
type VerificationQueryRow = VerificationRow & {
  wo_number: number; wo_title: string; wo_state: VerificationItem['workOrder']['state']; site_code: string; site_name: string
  latitude: number | null; longitude: number | null; thermographer_name: string | null; recorded_by_name: string | null
  make: string | null; model: string | null; serial: string | null
}

async function toItems(db: Db, orgId: string, rows: VerificationQueryRow[]): Promise<VerificationItem[]> {
  if (!rows.length) return []
  const findings = await findingQuery(db, orgId).where('f.id', 'in', [...new Set(rows.map((r) => r.finding_id))]).execute()
  const byId = new Map(findings.map((f) => [f.id, f]))
  return rows.map((r) => {
    const f = byId.get(r.finding_id)!
    return {
      id: r.id,
      workOrder: { id: r.work_order_id, reference: workOrderReference(r.wo_number), title: r.wo_title, state: r.wo_state },
      finding: {
        id: f.id, component: f.component, phase: f.phase, assetLabel: f.asset_label, band: f.band,
        effectiveBand: f.effective_band === null ? null : Number(f.effective_band), reading: readingOf(f),
      },
      site: { id: r.site_id, code: r.site_code, name: r.site_name, latitude: r.latitude, longitude: r.longitude },
      state: r.state,
      thermographer: r.thermographer_id ? { id: r.thermographer_id, name: r.thermographer_name ?? '—' } : null,
      surveyId: r.survey_id,
      instrument: r.instrument_id ? { id: r.instrument_id, label: `${r.make} ${r.model} · ${r.serial}` } : null,
      reading: r.recorded_at ? readingOf(r) : null,
      notes: r.notes,
      recordedBy: r.recorded_by ? { id: r.recorded_by, name: r.recorded_by_name ?? '—' } : null,
      recordedAt: r.recorded_at ? r.recorded_at.toISOString() : null,
      createdAt: r.created_at.toISOString(),
      version: r.version,
    }
  })
}

/** Every verification of one work order, oldest first (the work order page shows them all, failed ones included). */
export async function listVerificationsOf(db: Db, orgId: string, of: { workOrderId: string }): Promise<VerificationItem[]> {
  const rows = await verificationQuery(db, orgId).where('v.work_order_id', '=', of.workOrderId).orderBy('v.created_at').orderBy('v.id').execute()
  return toItems(db, orgId, rows as VerificationQueryRow[])
}

/** Verifications of the organisation, waiting ones first by site, paginated. `mine`: assigned to me or to nobody. */
export async function listVerifications(ctx: MemberContext, q: z.output<typeof verificationListQuerySchema>): Promise<Page<VerificationItem>> {
  const db = useDb()
  let query = verificationQuery(db, ctx.org.id)
  if (q.state) query = query.where('v.state', '=', q.state)
  if (q.siteId) query = query.where('v.site_id', '=', q.siteId)
  if (q.mine) query = query.where((eb) => eb.or([eb('v.thermographer_id', '=', ctx.user.id), eb('v.thermographer_id', 'is', null)]))
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    query.clearSelect().select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    query.orderBy(sql`case v.state when 'waiting' then 0 else 1 end`).orderBy('w.band', 'asc').orderBy('si.name').orderBy('v.created_at', 'desc').orderBy('v.id')
      .limit(limit).offset(offset).execute(),
  ])
  return { items: await toItems(db, ctx.org.id, rows as VerificationQueryRow[]), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

/** One verification; 404 when not this organisation's. */
export async function getVerification(ctx: MemberContext, id: string, db: Db = useDb()): Promise<VerificationItem> {
  const row = await verificationQuery(db, ctx.org.id).where('v.id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Verification')
  return (await toItems(db, ctx.org.id, [row as VerificationQueryRow]))[0]!
}

/** Looks the verification up before the body is read, so an id from elsewhere is a 404 whatever the body holds. */
export async function assertVerificationExists(ctx: MemberContext, id: string): Promise<void> {
  const row = await useDb().selectFrom('verifications').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
  if (!row) throw notFound('Verification')
}

async function checkThermographer(trx: Db, ctx: MemberContext, userId: string): Promise<string> {
  const m = await trx.selectFrom('memberships as m').innerJoin('users as u', 'u.id', 'm.user_id').select(['m.role', 'u.name'])
    .where('m.organisation_id', '=', ctx.org.id).where('m.user_id', '=', userId).where('m.removed_at', 'is', null).executeTakeFirst()
  if (!m || !can(m.role as Role, 'verifications.record')) fieldError('thermographerId', 'Choose a member who may record verifications (a thermographer, manager or owner).')
  return m.name
}

/**
 * Creates one waiting verification per finding of the work order that is not closed yet (called when the work order
 * moves to awaiting verification); returns how many were created.
 */
export async function requestVerifications(trx: Db, ctx: MemberContext, wo: LockedWorkOrder, thermographerId: string | null): Promise<number> {
  const name = thermographerId ? await checkThermographer(trx, ctx, thermographerId) : null
  const open = await trx.selectFrom('work_order_findings as wf')
    .innerJoin('findings as f', (j) => j.onRef('f.organisation_id', '=', 'wf.organisation_id').onRef('f.id', '=', 'wf.finding_id'))
    .select(['f.id', 'f.component'])
    .where('wf.organisation_id', '=', ctx.org.id).where('wf.work_order_id', '=', wo.id).where('f.closed_at', 'is', null)
    .orderBy('f.created_at').execute()
  for (const f of open) {
    const v = await trx.insertInto('verifications').values({
      organisation_id: ctx.org.id, work_order_id: wo.id, finding_id: f.id, site_id: wo.site_id, thermographer_id: thermographerId,
      survey_id: null, instrument_id: null, recorded_by: null, recorded_at: null,
      apparent_c: null, reference_c: null, ambient_c: null, emissivity: null, reflected_c: null, reflected_method: null, distance_m: null,
      transmittance: null, window_transmittance: null, window_c: null, load_a: null, rated_a: null, wind_ms: null, object_c: null,
      rise_over_reference_k: null, rise_over_ambient_k: null, load_scaled_rise_k: null, band: null, band_basis: null,
      uncertainty_low_c: null, uncertainty_high_c: null, criteria_id: null, criteria_version: null,
    }).returning('id').executeTakeFirstOrThrow()
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'verification', subjectId: v.id, workOrderId: wo.id, actorId: ctx.user.id, action: 'verification_requested',
      details: { component: f.component, findingId: f.id, thermographer: name, thermographerId },
    })
  }
  return open.length
}

/** Withdraws the waiting verifications of a work order (it was cancelled, or another re-scan failed). */
export async function withdrawWaiting(trx: Db, ctx: MemberContext, workOrderId: string, reason: string): Promise<void> {
  const rows = await trx.updateTable('verifications').set({ state: 'withdrawn', version: sql`version + 1`, updated_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('work_order_id', '=', workOrderId).where('state', '=', 'waiting')
    .returning(['id', 'finding_id']).execute()
  for (const r of rows) {
    const f = await trx.selectFrom('findings').select('component').where('organisation_id', '=', ctx.org.id).where('id', '=', r.finding_id).executeTakeFirstOrThrow()
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'verification', subjectId: r.id, workOrderId, actorId: ctx.user.id, action: 'verification_withdrawn',
      reason, details: { component: f.component, findingId: r.finding_id },
    })
  }
}

/** A manager (re)assigns the thermographer of a waiting verification; null leaves it for whoever next surveys the site. */
export async function assignVerification(ctx: MemberContext, id: string, input: z.output<typeof verificationAssignSchema>): Promise<VerificationItem> {
  await useDb().transaction().execute(async (trx) => {
    const v = await trx.selectFrom('verifications').select(['id', 'state', 'version', 'work_order_id', 'finding_id'])
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).forUpdate().executeTakeFirst()
    if (!v) throw notFound('Verification')
    if (v.version !== input.version) throw changedMeanwhile('verification')
    if (v.state !== 'waiting') conflict('Only a waiting verification can be assigned.')
    const name = input.thermographerId ? await checkThermographer(trx, ctx, input.thermographerId) : null
    await trx.updateTable('verifications').set({ thermographer_id: input.thermographerId, version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'verification', subjectId: id, workOrderId: v.work_order_id, actorId: ctx.user.id,
      action: 'verification_assigned', details: { thermographer: name, thermographerId: input.thermographerId },
    })
  })
  return getVerification(ctx, id)
}

/**
 * Records the re-scan of a waiting verification. The engine runs here, on the server, with the same criteria set the
 * finding was ranked with. No band: the verification passes and the finding closes as verified (and the work order
 * once all its findings are); a band: it fails, the other waiting re-scans are withdrawn and the work order reopens.
 */
export async function recordVerification(ctx: MemberContext, id: string, input: z.output<typeof verificationReadingSchema>): Promise<VerificationItem> {
  await useDb().transaction().execute(async (trx) => {
    const v = await trx.selectFrom('verifications').selectAll().where('organisation_id', '=', ctx.org.id).where('id', '=', id).forUpdate().executeTakeFirst()
    if (!v) throw notFound('Verification')
    const wo = await lockWorkOrder(trx, ctx, v.work_order_id)
    if (v.version !== input.version) throw changedMeanwhile('verification')
    if (v.state !== 'waiting') conflict(v.state === 'withdrawn' ? 'This verification was withdrawn: the work order is no longer awaiting verification.' : 'This verification has already been recorded.')
    if (wo.state !== 'awaiting_verification') conflict('The work order is not awaiting verification.')
    // A re-scan is the named thermographer's testimony; an unassigned one is taken by whoever records it.
    if (v.thermographer_id && v.thermographer_id !== ctx.user.id && ctx.member.role === 'thermographer') {
      throw createError({ statusCode: 403, statusMessage: 'Not your verification', data: { message: 'This verification is assigned to another thermographer.' } })
    }
    const inst = await engineInstrumentQuery(trx, ctx.org.id, input.instrumentId).where('archived_at', 'is', null).executeTakeFirst()
    if (!inst) fieldError('instrumentId', 'Choose an imager of this organisation that is not archived.')
    if (input.surveyId) {
      const s = await trx.selectFrom('surveys as s')
        .innerJoin('survey_sites as ss', (j) => j.onRef('ss.organisation_id', '=', 's.organisation_id').onRef('ss.survey_id', '=', 's.id'))
        .select('s.id').where('s.organisation_id', '=', ctx.org.id).where('s.id', '=', input.surveyId).where('ss.site_id', '=', v.site_id)
        .where('s.archived_at', 'is', null).executeTakeFirst()
      if (!s) fieldError('surveyId', 'Choose a survey of this organisation that visits the site.')
    }
    const finding = await trx.selectFrom('findings').select(['id', 'component', 'criteria_id'])
      .where('organisation_id', '=', ctx.org.id).where('id', '=', v.finding_id).executeTakeFirstOrThrow()
    const { today } = await workOrderSettings(trx, ctx.org.id)
    const chain = serverChain(inst, input as unknown as FindingValues, { criteriaId: finding.criteria_id, today })
    const passed = chain.rank.band === null
    const computed = computedColumns(chain)
    const now = new Date()
    await trx.updateTable('verifications').set({
      state: passed ? 'passed' : 'failed',
      thermographer_id: v.thermographer_id ?? ctx.user.id,
      survey_id: input.surveyId ?? null,
      instrument_id: input.instrumentId,
      ...readingColumns(input),
      notes: input.notes ?? '',
      ...computed,
      recorded_by: ctx.user.id,
      recorded_at: now,
      version: sql`version + 1`,
      updated_at: now,
    }).where('organisation_id', '=', ctx.org.id).where('id', '=', id).execute()
    const details = { component: finding.component, findingId: finding.id, objectC: Number(computed.object_c.toFixed(1)), band: chain.rank.band, basis: chain.rank.basis }
    await recordEvent(trx, {
      organisationId: ctx.org.id, subjectKind: 'verification', subjectId: id, workOrderId: wo.id, actorId: ctx.user.id,
      action: passed ? 'verification_passed' : 'verification_failed', details,
    })
    if (passed) {
      const reason = `Verified repaired: the re-scan on ${today} under ${workOrderReference(wo.number)} is below the lowest band.`
      await trx.updateTable('findings').set({ closed_at: now, closed_reason: reason, version: sql`version + 1`, updated_at: now })
        .where('organisation_id', '=', ctx.org.id).where('id', '=', finding.id).execute()
      await recordEvent(trx, {
        organisationId: ctx.org.id, subjectKind: 'finding', subjectId: finding.id, workOrderId: wo.id, actorId: ctx.user.id,
        action: 'closed_verified', reason, details: { verificationId: id, reference: workOrderReference(wo.number) },
      })
      const waiting = await trx.selectFrom('verifications').select((eb) => eb.fn.countAll<number>().as('n'))
        .where('organisation_id', '=', ctx.org.id).where('work_order_id', '=', wo.id).where('state', '=', 'waiting').executeTakeFirstOrThrow()
      if (Number(waiting.n) === 0) await closeWorkOrder(trx, ctx, wo.id)
      else await trx.updateTable('work_orders').set({ version: sql`version + 1`, updated_at: now }).where('organisation_id', '=', ctx.org.id).where('id', '=', wo.id).execute()
    } else {
      await withdrawWaiting(trx, ctx, wo.id, `The re-scan of ${finding.component} still ranks; the work order went back to open.`)
      await reopenWorkOrder(trx, ctx, wo, { verificationId: id, band: chain.rank.band!, component: finding.component, objectC: computed.object_c })
    }
  })
  return getVerification(ctx, id)
}

