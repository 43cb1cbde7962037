import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database'

// Survey reports in the demo (invented people): the qualifications printed on a report's cover. The reports
// themselves are made from the app (review page of the reviewed survey → "Make PDF report").
const QUALIFICATIONS: Record<string, string> = {
  thermographer: 'ISO 18436-7 category II thermographer (demo certificate LV-2231)',
  manager: 'ISO 18436-7 category III, programme lead (demo certificate LV-0907)',
}

/** Records the thermography qualification of the demo organisation's thermographer and manager. */
export async function seedDemoQualifications(trx: Kysely<Database> | Transaction<Database>, opts: { orgId: string }): Promise<void> {
  for (const [role, qualification] of Object.entries(QUALIFICATIONS)) {
    await trx.updateTable('memberships').set({ qualification })
      .where('organisation_id', '=', opts.orgId).where('role', '=', role as never).where('qualification', '=', '').execute()
  }
}
