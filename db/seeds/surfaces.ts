import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database'
import { SURFACES } from '../../shared/thermal/surfaces'

/**
 * Gives an organisation its starting surface library: the reference emissivities of the thermal engine's list
 * (reference sheet §4), each with its source. Safe to run twice: rows already seeded are left alone.
 */
export async function seedSurfaceLibrary(db: Kysely<Database> | Transaction<Database>, organisationId: string): Promise<void> {
  await db.insertInto('surfaces')
    .values(SURFACES.map((s) => ({
      organisation_id: organisationId,
      seed_key: s.id,
      name: s.name,
      emissivity: s.emissivity,
      range_low: s.range ? s.range[0] : null,
      range_high: s.range ? s.range[1] : null,
      source: s.source,
      provenance: s.provenance,
      method: null,
      measured_on: null,
      notes: '',
      created_by: null,
      archived_at: null,
    })))
    .onConflict((oc) => oc.columns(['organisation_id', 'seed_key']).where('seed_key', 'is not', null).doNothing())
    .execute()
}
