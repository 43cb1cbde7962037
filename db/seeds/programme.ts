import type { Transaction } from 'kysely'
import type { Database } from '../database'
import { seedSurfaceLibrary } from './surfaces'

// The demo's programme: both organisations get the reference surface library; Lowmoor Valley Power gets two
// imagers (one past its calibration date, so the flag shows), one measured surface and a route with its stops.
// All invented.

/** Adds the demo's instruments, surfaces and route to an already seeded demo organisation. */
export async function seedDemoProgramme(trx: Transaction<Database>, ids: { orgId: string; contractorId: string }): Promise<void> {
  await seedSurfaceLibrary(trx, ids.orgId)
  await seedSurfaceLibrary(trx, ids.contractorId)

  const year = new Date().getUTCFullYear()
  const inDate = await trx.insertInto('instruments').values({
    organisation_id: ids.orgId, make: 'Halden Optics', model: 'TX-640', serial: 'HO640-21877', band_from_um: 7.5, band_to_um: 14,
    ifov_mrad: 0.68, accuracy_k: 2, accuracy_pct: 2, calibration_due: `${year + 1}-03-31`, notes: 'Main survey imager; 25° lens.', archived_at: null,
  }).returning('id').executeTakeFirstOrThrow()
  await trx.insertInto('instruments').values({
    organisation_id: ids.orgId, make: 'Corvid Thermal', model: 'C-320 MW', serial: 'CT-0932', band_from_um: 3, band_to_um: 5,
    ifov_mrad: 1.3, accuracy_k: 1, accuracy_pct: 1, calibration_due: `${year - 1}-11-30`, notes: 'Spare; back from the lab late.', archived_at: null,
  }).execute()

  const manager = await trx.selectFrom('users').select(['id', 'name']).where('email', '=', 'manager@lowmoor.example').executeTakeFirstOrThrow()
  await trx.insertInto('surfaces').values({
    organisation_id: ids.orgId, seed_key: null, name: 'Busbar clamp, weathered tin plating (Harrow Cross)', emissivity: 0.38,
    range_low: null, range_high: null, source: `Measured by ${manager.name} per ASTM E1933 (contact thermometer on the surface)`,
    provenance: 'measured', method: 'contact_thermometer', measured_on: `${year - 1}-06-14`,
    notes: 'Three clamps on bay 2, load steady; contact probe and imager agreed within 0.5 K after ε set.', created_by: manager.id, archived_at: null,
  }).execute()

  const thermographer = await trx.selectFrom('users').select('id').where('email', '=', 'thermographer@lowmoor.example').executeTakeFirstOrThrow()
  const sites = await trx.selectFrom('sites').select(['id', 'code']).where('organisation_id', '=', ids.orgId).execute()
  const byCode = new Map(sites.map((s) => [s.code, s.id]))
  const route = await trx.insertInto('routes').values({
    organisation_id: ids.orgId, name: 'North and west substations', base_name: 'Lowmoor depot', base_latitude: 52.41, base_longitude: -1.97,
    recurrence_months: 12, thermographer_id: thermographer.id, instrument_id: inDate.id, notes: 'Start early: Millbrook Yard needs a switching permit.',
    archived_at: null,
  }).returning('id').executeTakeFirstOrThrow()
  const stops = ['HXS', 'MBY', 'ASH', 'BRK', 'LMR', 'TAN'].map((c) => byCode.get(c)).filter((id): id is string => !!id)
  if (stops.length) {
    await trx.insertInto('route_stops')
      .values(stops.map((siteId, position) => ({ organisation_id: ids.orgId, route_id: route.id, site_id: siteId, position })))
      .execute()
  }
}
