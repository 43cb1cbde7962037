import { sql, type Transaction } from 'kysely'
import type { Database } from '../database'
import { correctionChain } from '../../shared/thermal/index'
import { computedColumns, readingColumns } from '../../server/services/finding-columns'
import { findingChainInput, type FindingValues } from '../../shared/schemas/survey'
import { addDays, todayIn } from '../../shared/schedule'
import { DEFAULT_REPAIR_DEADLINES, repairDueOn } from '../../shared/work-orders'

// The demo's repair loop at Lowmoor Valley Power (all invented): a reviewed survey of three sites two months ago,
// and work orders raised from its findings in each state — one being repaired, one waiting for its re-scan, one
// closed as verified, one deferred for an outage, one reopened after a re-scan that still ranked — plus one
// finding at Millbrook Yard left open for the manager to raise. Readings go through the same engine as recorded findings.

type Reading = Pick<FindingValues, 'apparentC' | 'ambientC' | 'referenceC' | 'emissivity' | 'reflectedC' | 'reflectedMethod' | 'distanceM' | 'loadA' | 'ratedA'>

function computed(r: Reading, instrument: { band_from_um: string; band_to_um: string; accuracy_k: string | null; accuracy_pct: string | null; ifov_mrad: string | null }, today: string) {
  const { reading, options } = findingChainInput(r as FindingValues, {
    bandFromUm: Number(instrument.band_from_um), bandToUm: Number(instrument.band_to_um), accuracyK: instrument.accuracy_k === null ? null : Number(instrument.accuracy_k),
    accuracyPct: instrument.accuracy_pct === null ? null : Number(instrument.accuracy_pct), ifovMrad: instrument.ifov_mrad === null ? null : Number(instrument.ifov_mrad),
  }, { criteriaId: 'neta-100-18', today })
  const chain = correctionChain(reading, options)
  // The same columns the server stores for a recorded finding (server/services/finding-columns.ts).
  return { ...readingColumns(r), ...computedColumns(chain), action: chain.rank.action, repair_deadline_days: chain.rank.repairDeadlineDays }
}

const at = (day: string, hour: number) => new Date(`${day}T${String(hour).padStart(2, '0')}:00:00Z`)

/** Adds a reviewed survey with findings and work orders in every state to the seeded demo organisation. */
export async function seedDemoWorkOrders(trx: Transaction<Database>, ids: { orgId: string }): Promise<void> {
  const orgId = ids.orgId
  const org = await trx.selectFrom('organisations').select('time_zone').where('id', '=', orgId).executeTakeFirstOrThrow()
  const today = todayIn(org.time_zone)
  const user = async (email: string) => (await trx.selectFrom('users').select(['id', 'name']).where('email', '=', email).executeTakeFirstOrThrow())
  const manager = await user('manager@lowmoor.example')
  const thermographer = await user('thermographer@lowmoor.example')
  const crew = await user('crew@lowmoor.example')
  const instrument = await trx.selectFrom('instruments').select(['id', 'band_from_um', 'band_to_um', 'accuracy_k', 'accuracy_pct', 'ifov_mrad'])
    .where('organisation_id', '=', orgId).where('serial', '=', 'HO640-21877').executeTakeFirstOrThrow()
  const sites = await trx.selectFrom('sites').select(['id', 'code']).where('organisation_id', '=', orgId).where('code', 'in', ['HXS', 'MBY', 'FEN']).execute()
  const siteId = (code: string) => sites.find((s) => s.code === code)!.id
  const assets = await trx.selectFrom('assets').select(['id', 'site_id', 'label']).where('organisation_id', '=', orgId)
    .where('site_id', 'in', sites.map((s) => s.id)).orderBy('label').execute()
  const assetAt = (code: string, n: number) => assets.filter((a) => a.site_id === siteId(code))[n]!

  // The survey: two months ago, reviewed.
  const surveyedOn = addDays(today, -60)
  const survey = await trx.insertInto('surveys').values({
    organisation_id: orgId, route_id: null, planned_for: surveyedOn, thermographer_id: thermographer.id, instrument_id: instrument.id,
    state: 'reviewed', review_comments: 'Findings ranked; repairs raised.', reviewed_by: manager.id, started_at: at(surveyedOn, 8),
    submitted_at: at(surveyedOn, 15), reviewed_at: at(addDays(surveyedOn, 1), 9), created_by: manager.id, archived_at: null,
  }).returning('id').executeTakeFirstOrThrow()
  for (const [position, code] of ['HXS', 'MBY', 'FEN'].entries()) {
    await trx.insertInto('survey_sites').values({ organisation_id: orgId, survey_id: survey.id, site_id: siteId(code), position, ambient_c: 12, wind_ms: 1.5, humidity_pct: 70, sky: 'overcast' }).execute()
  }
  const base = { ambientC: 12, emissivity: 0.9, reflectedC: 12, reflectedMethod: 'reflector' as const, distanceM: 4 }
  const findingSpecs = [
    { key: 'hxs-a', code: 'HXS', n: 0, component: 'Line-side clamp, phase B', phase: 'B', cause: 'loose_connection', r: { ...base, apparentC: 68, referenceC: 24 } },
    { key: 'hxs-b', code: 'HXS', n: 1, component: 'Load-side lug', phase: 'A', cause: 'corroded_connection', r: { ...base, apparentC: 33, referenceC: 24 } },
    { key: 'hxs-c', code: 'HXS', n: 2, component: 'Top bushing connector', phase: 'C', cause: 'loose_connection', r: { ...base, apparentC: 44, referenceC: 26 } },
    { key: 'mby-a', code: 'MBY', n: 0, component: 'Disconnect jaw', phase: 'A', cause: 'failing_component', r: { ...base, apparentC: 40, referenceC: 27 } },
    { key: 'mby-b', code: 'MBY', n: 1, component: 'Bus joint', phase: '', cause: 'loose_connection', r: { ...base, apparentC: 26, referenceC: 24 } },
    { key: 'fen-a', code: 'FEN', n: 0, component: 'Cable termination lug', phase: 'B', cause: 'loose_connection', r: { ...base, apparentC: 38, referenceC: 25 } },
    { key: 'fen-b', code: 'FEN', n: 1, component: 'Breaker stab', phase: 'C', cause: 'corroded_connection', r: { ...base, apparentC: 35, referenceC: 25 } },
  ] as const
  const findingIds: Record<string, string> = {}
  const findingBand: Record<string, number | null> = {}
  const checked = new Set<string>()
  for (const f of findingSpecs) {
    const asset = assetAt(f.code, f.n)
    let check = await trx.selectFrom('checks').select('id').where('survey_id', '=', survey.id).where('asset_id', '=', asset.id).executeTakeFirst()
    if (!check) {
      check = await trx.insertInto('checks').values({ organisation_id: orgId, survey_id: survey.id, asset_id: asset.id, outcome: 'finding', reason: null, checked_by: thermographer.id }).returning('id').executeTakeFirstOrThrow()
    }
    checked.add(asset.id)
    const values = computed(f.r, instrument, surveyedOn)
    const row = await trx.insertInto('findings').values({
      organisation_id: orgId, check_id: check.id, component: f.component, phase: f.phase, probable_cause: f.cause, ...values,
    }).returning('id').executeTakeFirstOrThrow()
    findingIds[f.key] = row.id
    findingBand[f.key] = values.band
  }
  // Every other asset at the three sites was looked at and found clear.
  for (const a of assets) {
    if (!checked.has(a.id)) await trx.insertInto('checks').values({ organisation_id: orgId, survey_id: survey.id, asset_id: a.id, outcome: 'clear', reason: null, checked_by: thermographer.id }).execute()
  }

  let number = 0
  const event = (e: { subject_kind: 'finding' | 'work_order' | 'verification'; subject_id: string; work_order_id: string; actor_id: string; action: string; reason?: string; details: Record<string, unknown>; created_at: Date }) =>
    trx.insertInto('record_events').values({ organisation_id: orgId, reason: '', ...e, details: JSON.stringify(e.details) }).execute()

  async function raise(spec: { keys: string[]; code: string; title: string; instructions: string; raisedOn: string; state: 'open' | 'planned' | 'in_repair' | 'awaiting_verification' | 'closed' | 'deferred'; reason?: string; deferredUntil?: string }) {
    number++
    const band = Math.min(...spec.keys.map((k) => findingBand[k] ?? 9))
    const dueOn = spec.deferredUntil ?? repairDueOn([band === 9 ? null : band], DEFAULT_REPAIR_DEADLINES, spec.raisedOn)
    const wo = await trx.insertInto('work_orders').values({
      organisation_id: orgId, site_id: siteId(spec.code), number, title: spec.title, instructions: spec.instructions, state: spec.state,
      band: band === 9 ? null : band, due_on: dueOn, state_reason: spec.reason ?? '', deferred_until: spec.deferredUntil ?? null,
      time_spent_minutes: null, created_by: manager.id, closed_at: null, archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    for (const k of spec.keys) await trx.insertInto('work_order_findings').values({ organisation_id: orgId, work_order_id: wo.id, finding_id: findingIds[k]! }).execute()
    await trx.insertInto('work_order_assignees').values({ organisation_id: orgId, work_order_id: wo.id, user_id: crew.id }).execute()
    await event({ subject_kind: 'work_order', subject_id: wo.id, work_order_id: wo.id, actor_id: manager.id, action: 'raised', details: { reference: `WO-${number}`, findingCount: spec.keys.length, band, dueOn }, created_at: at(spec.raisedOn, 9) })
    await event({ subject_kind: 'work_order', subject_id: wo.id, work_order_id: wo.id, actor_id: manager.id, action: 'assigned', details: { names: [crew.name], userIds: [crew.id] }, created_at: at(spec.raisedOn, 9) })
    return { id: wo.id, number }
  }
  const moved = (woId: string, from: string, to: string, day: string, hour: number) =>
    event({ subject_kind: 'work_order', subject_id: woId, work_order_id: woId, actor_id: crew.id, action: 'state_changed', details: { from, to }, created_at: at(day, hour) })
  async function verification(woId: string, key: string, day: string, state: 'waiting' | 'passed' | 'failed', r?: Reading) {
    const values = r ? computed(r, instrument, day) : null
    const v = await trx.insertInto('verifications').values({
      organisation_id: orgId, work_order_id: woId, finding_id: findingIds[key]!, site_id: (await trx.selectFrom('work_orders').select('site_id').where('id', '=', woId).executeTakeFirstOrThrow()).site_id,
      thermographer_id: thermographer.id, survey_id: null, instrument_id: values ? instrument.id : null, state,
      recorded_by: values ? thermographer.id : null, recorded_at: values ? at(day, 11) : null,
      ...(values ? (({ action: _a, repair_deadline_days: _d, ...rest }) => rest)(values) : {
        apparent_c: null, reference_c: null, ambient_c: null, emissivity: null, reflected_c: null, reflected_method: null, distance_m: null, transmittance: null,
        window_transmittance: null, window_c: null, load_a: null, rated_a: null, wind_ms: null, object_c: null, rise_over_reference_k: null, rise_over_ambient_k: null,
        load_scaled_rise_k: null, band: null, band_basis: null, uncertainty_low_c: null, uncertainty_high_c: null, criteria_id: null, criteria_version: null,
      }),
    }).returning('id').executeTakeFirstOrThrow()
    const component = findingSpecs.find((f) => f.key === key)!.component
    await event({ subject_kind: 'verification', subject_id: v.id, work_order_id: woId, actor_id: crew.id, action: 'verification_requested', details: { component, findingId: findingIds[key], thermographer: thermographer.name }, created_at: at(day, 8) })
    if (values) {
      await event({ subject_kind: 'verification', subject_id: v.id, work_order_id: woId, actor_id: thermographer.id, action: state === 'passed' ? 'verification_passed' : 'verification_failed', details: { component, findingId: findingIds[key], objectC: Number(values.object_c.toFixed(1)), band: values.band }, created_at: at(day, 11) })
    }
    return { id: v.id, band: values?.band ?? null }
  }

  // 1. Being repaired: the band 1 clamp and the lug beside it at Harrow Cross.
  const raised1 = addDays(surveyedOn, 2)
  const wo1 = await raise({ keys: ['hxs-a', 'hxs-b'], code: 'HXS', title: 'Harrow Cross: hot clamp and lug on the incomer', instructions: 'Switch out under permit. Clean, replace the clamp, torque to the maker’s figure. Check the lug while the bay is dead.', raisedOn: raised1, state: 'in_repair' })
  await moved(wo1.id, 'open', 'planned', raised1, 14)
  await moved(wo1.id, 'planned', 'in_repair', addDays(today, -1), 7)
  await trx.updateTable('work_orders').set({ due_on: addDays(today, 2), version: 3 }).where('id', '=', wo1.id).execute()

  // 2. Awaiting verification: Millbrook Yard disconnect jaw.
  const raised2 = addDays(surveyedOn, 3)
  const wo2 = await raise({ keys: ['mby-a'], code: 'MBY', title: 'Millbrook Yard: disconnect jaw running hot', instructions: 'Needs a switching permit. Dress or replace the jaw contacts.', raisedOn: raised2, state: 'awaiting_verification' })
  await trx.updateTable('work_orders').set({ cause_found: 'Pitted jaw contacts', parts: '1 × jaw contact set', work_done: 'Replaced the contact set and greased', time_spent_minutes: 150 }).where('id', '=', wo2.id).execute()
  await moved(wo2.id, 'open', 'in_repair', addDays(today, -6), 8)
  await event({ subject_kind: 'work_order', subject_id: wo2.id, work_order_id: wo2.id, actor_id: crew.id, action: 'work_recorded', details: {}, created_at: at(addDays(today, -6), 12) })
  await moved(wo2.id, 'in_repair', 'awaiting_verification', addDays(today, -6), 13)
  await verification(wo2.id, 'mby-a', addDays(today, -6), 'waiting')

  // 3. Closed as verified: Fenwick Lane termination lug, re-scanned cool.
  const raised3 = addDays(surveyedOn, 2)
  const wo3 = await raise({ keys: ['fen-a'], code: 'FEN', title: 'Fenwick Lane: cable termination lug', instructions: 'Re-make the termination.', raisedOn: raised3, state: 'closed' })
  await trx.updateTable('work_orders').set({ cause_found: 'Lug not crimped fully', parts: '1 × 240 mm² lug', work_done: 'Cut back and re-crimped', time_spent_minutes: 90, closed_at: at(addDays(today, -20), 11) }).where('id', '=', wo3.id).execute()
  await moved(wo3.id, 'open', 'in_repair', addDays(today, -25), 8)
  await moved(wo3.id, 'in_repair', 'awaiting_verification', addDays(today, -25), 12)
  const passed = await verification(wo3.id, 'fen-a', addDays(today, -20), 'passed', { ...base, ambientC: undefined, apparentC: 25.4, referenceC: 25 })
  const closedReason = `Verified repaired: the re-scan on ${addDays(today, -20)} under WO-${wo3.number} is below the lowest band.`
  await trx.updateTable('findings').set({ closed_at: at(addDays(today, -20), 11), closed_reason: closedReason }).where('id', '=', findingIds['fen-a']!).execute()
  await event({ subject_kind: 'finding', subject_id: findingIds['fen-a']!, work_order_id: wo3.id, actor_id: thermographer.id, action: 'closed_verified', reason: closedReason, details: { verificationId: passed.id }, created_at: at(addDays(today, -20), 11) })
  await event({ subject_kind: 'work_order', subject_id: wo3.id, work_order_id: wo3.id, actor_id: thermographer.id, action: 'closed', details: {}, created_at: at(addDays(today, -20), 11) })

  // 4. Deferred: the breaker stab needs an outage.
  const until = addDays(today, 40)
  const reason4 = 'Needs a feeder outage; the next planned window is next month.'
  const wo4 = await raise({ keys: ['fen-b'], code: 'FEN', title: 'Fenwick Lane: breaker stab', instructions: 'Clean and re-grease the stab; replace if pitted.', raisedOn: addDays(surveyedOn, 2), state: 'deferred', reason: reason4, deferredUntil: until })
  await event({ subject_kind: 'work_order', subject_id: wo4.id, work_order_id: wo4.id, actor_id: crew.id, action: 'deferred', reason: reason4, details: { from: 'open', until }, created_at: at(addDays(today, -10), 10) })

  // 5. Reopened: the bushing connector was re-torqued but the re-scan still ranked.
  const raised5 = addDays(surveyedOn, 2)
  const wo5 = await raise({ keys: ['hxs-c'], code: 'HXS', title: 'Harrow Cross: transformer bushing connector', instructions: 'Re-torque the connector; check the palm for damage.', raisedOn: raised5, state: 'open' })
  await moved(wo5.id, 'open', 'in_repair', addDays(today, -15), 8)
  await moved(wo5.id, 'in_repair', 'awaiting_verification', addDays(today, -15), 11)
  const failed = await verification(wo5.id, 'hxs-c', addDays(today, -12), 'failed', { ...base, apparentC: 39, referenceC: 26 })
  const reason5 = `The re-scan of Top bushing connector still ranks band ${failed.band}.`
  await trx.updateTable('work_orders').set({ state_reason: reason5, cause_found: 'Connector re-torqued; palm face looked pitted', band: failed.band }).where('id', '=', wo5.id).execute()
  await event({ subject_kind: 'work_order', subject_id: wo5.id, work_order_id: wo5.id, actor_id: thermographer.id, action: 'reopened', reason: reason5, details: { band: failed.band }, created_at: at(addDays(today, -12), 11) })

  await trx.updateTable('organisations').set({ work_order_counter: number }).where('id', '=', orgId).execute()
  // Timestamps of the rows follow their story rather than the moment the seed ran.
  await sql`update work_orders set created_at = (select min(e.created_at) from record_events e where e.work_order_id = work_orders.id) where organisation_id = ${orgId}`.execute(trx)
}
