import type { Kysely } from 'kysely'
import { addTenantWall, dropTenantWall } from '../tenant-wall'

// Frozen in time: the tenant tables as they stood when the wall went up (every table with an organisation_id column).
// Tables added later get the wall in their own migration (see db/tenant-wall.ts); this list is never extended.
const TENANT_TABLES = [
  'api_token_requests', 'api_token_windows', 'api_tokens', 'assets', 'attachments', 'billing_invoices', 'checks', 'findings',
  'idempotency_keys', 'instruments', 'invitations', 'memberships', 'notice_preferences', 'notices', 'organisation_billing',
  'outbox', 'record_events', 'register_import_rows', 'register_imports', 'route_stops', 'routes', 'sites', 'stripe_events',
  'surfaces', 'survey_reports', 'survey_sites', 'surveys', 'temperature_grids', 'verifications', 'work_order_assignees',
  'work_order_findings', 'work_orders',
]

export async function up(db: Kysely<any>): Promise<void> {
  for (const table of TENANT_TABLES) await addTenantWall(db, table)
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of TENANT_TABLES) await dropTenantWall(db, table)
}
