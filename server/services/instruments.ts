import { sql } from 'kysely'
import type { z } from 'zod'
import { bandLabel, calibrationStatus } from '#shared/instruments'
import { todayIn } from '#shared/schedule'
import type { instrumentCreateSchema, instrumentListQuerySchema, instrumentUpdateSchema } from '#shared/schemas/instrument'
import type { InstrumentItem, Page } from '#shared/types/programme'
import { changedMeanwhile, isUniqueViolation, likePattern, num, pageWindow } from './paging'
import { record } from './audit'

const columns = [
  'i.id', 'i.make', 'i.model', 'i.serial', 'i.band_from_um', 'i.band_to_um', 'i.ifov_mrad', 'i.accuracy_k', 'i.accuracy_pct',
  'i.notes', 'i.archived_at', 'i.version',
] as const

type Row = {
  id: string; make: string; model: string; serial: string; band_from_um: string; band_to_um: string; ifov_mrad: string | null
  accuracy_k: string | null; accuracy_pct: string | null; notes: string; archived_at: Date | null; version: number; calibration_due: string | null
}

async function orgToday(orgId: string): Promise<string> {
  const o = await useDb().selectFrom('organisations').select('time_zone').where('id', '=', orgId).executeTakeFirstOrThrow()
  return todayIn(o.time_zone)
}

/** Row → API object; the calibration flag is judged on the organisation's local date. */
export function toInstrumentItem(r: Row, today: string): InstrumentItem {
  const from = Number(r.band_from_um)
  const to = Number(r.band_to_um)
  return {
    id: r.id, make: r.make, model: r.model, serial: r.serial, bandFromUm: from, bandToUm: to, bandLabel: bandLabel(from, to),
    ifovMrad: num(r.ifov_mrad), accuracyK: num(r.accuracy_k), accuracyPct: num(r.accuracy_pct),
    calibrationDue: r.calibration_due, calibrationStatus: calibrationStatus(r.calibration_due, today),
    notes: r.notes, archivedAt: r.archived_at ? r.archived_at.toISOString() : null, version: r.version,
  }
}

function base(orgId: string) {
  return useDb().selectFrom('instruments as i')
    .select(columns)
    .select(sql<string | null>`to_char(i.calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
    .where('i.organisation_id', '=', orgId)
}

/** Instruments of the organisation, filtered, sorted and paginated. */
export async function listInstruments(ctx: MemberContext, q: z.output<typeof instrumentListQuerySchema>): Promise<Page<InstrumentItem>> {
  let query = useDb().selectFrom('instruments as i').where('i.organisation_id', '=', ctx.org.id)
  if (q.status === 'active') query = query.where('i.archived_at', 'is', null)
  if (q.status === 'archived') query = query.where('i.archived_at', 'is not', null)
  if (q.q) {
    const like = likePattern(q.q)
    query = query.where((eb) => eb.or([eb('i.make', 'ilike', like), eb('i.model', 'ilike', like), eb('i.serial', 'ilike', like)]))
  }
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows, today] = await Promise.all([
    query.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    query.select(columns).select(sql<string | null>`to_char(i.calibration_due, 'YYYY-MM-DD')`.as('calibration_due'))
      .$if(q.sort === 'calibration', (b) => b.orderBy(sql`i.calibration_due asc nulls last`))
      .orderBy('i.make').orderBy('i.model').orderBy('i.serial').orderBy('i.id')
      .limit(limit).offset(offset).execute(),
    orgToday(ctx.org.id),
  ])
  return { items: rows.map((r) => toInstrumentItem(r, today)), total: Number(count.n), page: q.page, pageSize: q.pageSize }
}

/** One instrument of the organisation, archived or not; 404 otherwise. */
export async function getInstrument(ctx: MemberContext, id: string): Promise<InstrumentItem> {
  const [row, today] = await Promise.all([base(ctx.org.id).where('i.id', '=', id).executeTakeFirst(), orgToday(ctx.org.id)])
  if (!row) throw notFound('Instrument')
  return toInstrumentItem(row, today)
}

function duplicateSerial(err: unknown): never {
  if (isUniqueViolation(err, 'instruments_active_serial_key')) {
    fieldError('serial', 'An active instrument of this make already has this serial number.', 409)
  }
  throw err
}

/** Registers an imager. */
export async function createInstrument(ctx: MemberContext, input: z.output<typeof instrumentCreateSchema>): Promise<InstrumentItem> {
  const row = await useDb().insertInto('instruments').values({
    organisation_id: ctx.org.id, make: input.make, model: input.model, serial: input.serial,
    band_from_um: input.bandFromUm, band_to_um: input.bandToUm, ifov_mrad: input.ifovMrad ?? null,
    accuracy_k: input.accuracyK ?? null, accuracy_pct: input.accuracyPct ?? null, calibration_due: input.calibrationDue ?? null,
    notes: input.notes ?? '', archived_at: null,
  }).returning('id').executeTakeFirstOrThrow().catch(duplicateSerial)
  return getInstrument(ctx, row.id)
}

async function versioned(
  ctx: MemberContext, id: string, version: number, set: Record<string, unknown>, audit?: 'instrument.archived' | 'instrument.restored',
): Promise<InstrumentItem> {
  const row = await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('instruments').select(['archived_at', 'make', 'model', 'serial'])
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).forUpdate().executeTakeFirst()
    const updated = await trx.updateTable('instruments')
      .set({ ...set, version: sql`version + 1`, updated_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('version', '=', version)
      .returning('id').executeTakeFirst()
    // Recorded only when the archive state really changed.
    if (updated && before && audit && (before.archived_at === null) === (audit === 'instrument.archived')) {
      await record(trx, { ctx, action: audit, target: { kind: 'instrument', id, label: `${before.make} ${before.model} (${before.serial})` } })
    }
    return updated
  }).catch(duplicateSerial)
  if (!row) {
    await getInstrument(ctx, id) // 404 when it is not this organisation's
    throw changedMeanwhile('instrument')
  }
  return getInstrument(ctx, id)
}

/** Changes an instrument (optimistic locking on `version`). */
export function updateInstrument(ctx: MemberContext, id: string, input: z.output<typeof instrumentUpdateSchema>): Promise<InstrumentItem> {
  const set = changedColumns(input, {
    make: 'make', model: 'model', serial: 'serial', bandFromUm: 'band_from_um', bandToUm: 'band_to_um', ifovMrad: 'ifov_mrad',
    accuracyK: 'accuracy_k', accuracyPct: 'accuracy_pct', calibrationDue: 'calibration_due', notes: 'notes',
  })
  return versioned(ctx, id, input.version, set)
}

/** Archives (never deletes) an instrument: routes and records that name it keep it. */
export function archiveInstrument(ctx: MemberContext, id: string, version: number): Promise<InstrumentItem> {
  return versioned(ctx, id, version, { archived_at: sql`coalesce(archived_at, now())` }, 'instrument.archived')
}

/** Brings an archived instrument back. */
export function restoreInstrument(ctx: MemberContext, id: string, version: number): Promise<InstrumentItem> {
  return versioned(ctx, id, version, { archived_at: null }, 'instrument.restored')
}
