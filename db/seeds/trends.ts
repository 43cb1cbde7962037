import type { Transaction } from 'kysely'
import type { Database } from '../database'
import { ZERO_CELSIUS_K, correctionChain } from '../../shared/thermal/index'
import { findingChainInput, type FindingValues } from '../../shared/schemas/survey'
import { addDays, todayIn } from '../../shared/schedule'

// Earlier readings for the demo's trends (all invented): Millbrook Yard was surveyed 14 and 8 months ago, and the
// disconnect jaw (phase A) that the work-order demo finds hot two months ago was already warming. With those three
// readings its trend on the asset page shows a rising line towards the next band edge. The earlier findings were
// recorded for trending only; they are closed as superseded so they do not sit in the open lists.

const at = (day: string, hour: number) => new Date(`${day}T${String(hour).padStart(2, '0')}:00:00Z`)

/** Adds two earlier reviewed surveys of Millbrook Yard with readings of the same component. Call after seedDemoWorkOrders. */
export async function seedDemoTrends(trx: Transaction<Database>, ids: { orgId: string }): Promise<void> {
  const orgId = ids.orgId
  const org = await trx.selectFrom('organisations').select('time_zone').where('id', '=', orgId).executeTakeFirstOrThrow()
  const today = todayIn(org.time_zone)
  const user = async (email: string) => (await trx.selectFrom('users').select(['id']).where('email', '=', email).executeTakeFirstOrThrow())
  const manager = await user('manager@lowmoor.example')
  const thermographer = await user('thermographer@lowmoor.example')
  const instrument = await trx.selectFrom('instruments').select(['id', 'band_from_um', 'band_to_um', 'accuracy_k', 'accuracy_pct', 'ifov_mrad'])
    .where('organisation_id', '=', orgId).where('serial', '=', 'HO640-21877').executeTakeFirstOrThrow()
  const site = await trx.selectFrom('sites').select('id').where('organisation_id', '=', orgId).where('code', '=', 'MBY').executeTakeFirstOrThrow()
  const assets = await trx.selectFrom('assets').select('id').where('organisation_id', '=', orgId).where('site_id', '=', site.id).orderBy('label').execute()
  const jaw = assets[0]!

  const readings = [
    { monthsAgo: 14, apparentC: 31, referenceC: 26 },
    { monthsAgo: 8, apparentC: 35, referenceC: 27 },
  ]
  for (const r of readings) {
    const day = addDays(today, -Math.round(r.monthsAgo * 30.4))
    const survey = await trx.insertInto('surveys').values({
      organisation_id: orgId, route_id: null, planned_for: day, thermographer_id: thermographer.id, instrument_id: instrument.id,
      state: 'reviewed', review_comments: '', reviewed_by: manager.id, started_at: at(day, 8), submitted_at: at(day, 14),
      reviewed_at: at(addDays(day, 1), 9), created_by: manager.id, archived_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('survey_sites').values({ organisation_id: orgId, survey_id: survey.id, site_id: site.id, position: 0, ambient_c: 12, wind_ms: 1, humidity_pct: 65, sky: 'overcast' }).execute()
    for (const a of assets) {
      const check = await trx.insertInto('checks').values({
        organisation_id: orgId, survey_id: survey.id, asset_id: a.id, outcome: a.id === jaw.id ? 'finding' : 'clear', reason: null, checked_by: thermographer.id,
      }).returning('id').executeTakeFirstOrThrow()
      if (a.id !== jaw.id) continue
      const values: Partial<FindingValues> = {
        apparentC: r.apparentC, referenceC: r.referenceC, ambientC: 12, emissivity: 0.9, reflectedC: 12, reflectedMethod: 'reflector', distanceM: 4,
      }
      const { reading, options } = findingChainInput(values as FindingValues, {
        bandFromUm: Number(instrument.band_from_um), bandToUm: Number(instrument.band_to_um),
        accuracyK: instrument.accuracy_k === null ? null : Number(instrument.accuracy_k),
        accuracyPct: instrument.accuracy_pct === null ? null : Number(instrument.accuracy_pct),
        ifovMrad: instrument.ifov_mrad === null ? null : Number(instrument.ifov_mrad),
      }, { criteriaId: 'neta-100-18', today: day })
      const chain = correctionChain(reading, options)
      const k = (v: number) => v - ZERO_CELSIUS_K
      await trx.insertInto('findings').values({
        organisation_id: orgId, check_id: check.id, component: 'Disconnect jaw', phase: 'A', probable_cause: 'failing_component',
        apparent_c: r.apparentC, reference_c: r.referenceC, ambient_c: 12, emissivity: 0.9, reflected_c: 12, reflected_method: 'reflector',
        distance_m: 4, transmittance: null, window_transmittance: null, window_c: null, load_a: null, rated_a: null, wind_ms: null,
        object_c: k(chain.hotObjectK), rise_over_reference_k: chain.measured.overReferenceK ?? null, rise_over_ambient_k: chain.measured.overAmbientK ?? null,
        load_scaled_rise_k: null, band: chain.rank.band, band_basis: chain.rank.basis, action: chain.rank.action,
        repair_deadline_days: chain.rank.repairDeadlineDays,
        uncertainty_low_c: chain.hotInterval ? k(chain.hotInterval.low) : null, uncertainty_high_c: chain.hotInterval ? k(chain.hotInterval.high) : null,
        warnings: JSON.stringify(chain.warnings), criteria_id: chain.rank.criteriaId, criteria_version: chain.rank.criteriaVersion,
        notes: 'Recorded for trending.', closed_at: at(addDays(day, 1), 9), closed_reason: 'Superseded by the next survey (kept for the trend).',
      }).execute()
    }
  }
}
