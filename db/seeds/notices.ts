import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '../database'
import type { NewNotice } from '../tables/notices'

// Demo notices, so the bell and the Notices page show something right after `npm run setup`. In-app only: no
// outbox rows, so setting up never sends e-mail. Dedupe keys match the daily jobs', so those add no twin later.
export async function seedDemoNotices(db: Kysely<Database> | Transaction<Database>, ids: { orgId: string }): Promise<void> {
  const org = await db.selectFrom('organisations').select(['slug']).where('id', '=', ids.orgId).executeTakeFirstOrThrow()
  const managers = await db.selectFrom('memberships').select('user_id')
    .where('organisation_id', '=', ids.orgId).where('role', 'in', ['owner', 'manager']).where('removed_at', 'is', null).execute()
  const instruments = await db.selectFrom('instruments').select(['id', 'make', 'model', 'serial']).select(sql<string>`to_char(calibration_due, 'YYYY-MM-DD')`.as('due'))
    .where('organisation_id', '=', ids.orgId).where('archived_at', 'is', null).where('calibration_due', 'is not', null).execute()
  const today = new Date().toISOString().slice(0, 10)
  const rows: NewNotice[] = []
  for (const i of instruments) {
    const due = i.due
    if (due >= today) continue
    for (const m of managers) {
      rows.push({
        organisation_id: ids.orgId, user_id: m.user_id, kind: 'calibration_due',
        title: `Calibration of ${i.make} ${i.model} (serial ${i.serial}) has lapsed`,
        body: `Its calibration was due on ${new Date(`${due}T12:00:00Z`).toLocaleDateString('en-GB', { weekday: 'short', day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })}. Findings recorded with it carry a warning until a new calibration date is entered.`,
        link: `/orgs/${org.slug}/instruments`, dedupe_key: `calibration_due:${i.id}:${due}`,
      })
    }
  }
  if (rows.length) await db.insertInto('notices').values(rows).onConflict((oc) => oc.columns(['organisation_id', 'user_id', 'dedupe_key']).doNothing()).execute()
}
