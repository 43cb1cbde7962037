// Test hook only: what the tenant wall (db/tenant-wall.ts) lets this request's database connections see, so the
// row-security test can prove the app sets the organisation per request. Absent unless NUXT_TEST_HOOKS=1, which
// only the test set-up sets; production never does.
import { sql } from 'kysely'

export default defineEventHandler(async (event) => {
  if (process.env.NUXT_TEST_HOOKS !== '1') {
    throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'Not found.' } })
  }
  const ctx = await requireMember(event, { permission: 'organisation.view' })
  const db = useDb()
  const setting = sql<{ value: string | null }>`select current_setting('greybody.org', true) as value`
  // Deliberately without an organisation condition: only the wall can narrow these counts to this organisation.
  const visible = sql<{ sites: number; organisations: number }>`
    select count(*)::int as sites, count(distinct organisation_id)::int as organisations from sites`
  const [plain, inTransaction, sites, system] = await Promise.all([
    setting.execute(db),
    db.transaction().execute((trx) => setting.execute(trx)),
    visible.execute(db),
    runAsSystem(() => setting.execute(db)),
  ])
  return {
    organisationId: ctx.org.id,
    setting: plain.rows[0]?.value ?? null,
    settingInTransaction: inTransaction.rows[0]?.value ?? null,
    settingForSystemWork: system.rows[0]?.value ?? null,
    visibleSites: sites.rows[0]!.sites,
    visibleOrganisations: sites.rows[0]!.organisations,
  }
})
