import type { UsersTable } from './tables/users'
import type { OrganisationsTable } from './tables/organisations'
import type { MembershipsTable } from './tables/memberships'
import type { InvitationsTable } from './tables/invitations'
import type { PasswordResetsTable } from './tables/password-resets'
import type { SignInFailuresTable } from './tables/sign-in-failures'
import type { SitesTable } from './tables/sites'
import type { AssetsTable } from './tables/assets'
import type { RegisterImportsTable } from './tables/register-imports'
import type { RegisterImportRowsTable } from './tables/register-import-rows'
import type { InstrumentsTable } from './tables/instruments'
import type { SurfacesTable } from './tables/surfaces'
import type { RoutesTable } from './tables/routes'
import type { RouteStopsTable } from './tables/route-stops'
import type { OrganisationBillingTable } from './tables/organisation-billing'
import type { StripeEventsTable } from './tables/stripe-events'
import type { BillingInvoicesTable } from './tables/billing-invoices'
import type { SurveysTable } from './tables/surveys'
import type { SurveySitesTable } from './tables/survey-sites'
import type { ChecksTable } from './tables/checks'
import type { FindingsTable } from './tables/findings'
import type { TemperatureGridsTable } from './tables/temperature-grids'
import type { AttachmentsTable } from './tables/attachments'
import type { IdempotencyKeysTable } from './tables/idempotency-keys'
import type { NoticesTable } from './tables/notices'
import type { NoticePreferencesTable } from './tables/notice-preferences'
import type { OutboxTable } from './tables/outbox'
import type { JobRunsTable } from './tables/job-runs'
import type { WorkOrdersTable } from './tables/work-orders'
import type { WorkOrderFindingsTable } from './tables/work-order-findings'
import type { WorkOrderAssigneesTable } from './tables/work-order-assignees'
import type { VerificationsTable } from './tables/verifications'
import type { RecordEventsTable } from './tables/record-events'
import type { SurveyReportsTable } from './tables/survey-reports'
import type { ApiTokensTable, ApiTokenRequestsTable, ApiTokenWindowsTable } from './tables/api-tokens'
import type { AuditEventsTable, AccountEventsTable } from './tables/audit-events'

/** The Kysely schema of Greybody's database: one interface per table, snake_case as stored. */
export interface Database {
  users: UsersTable
  organisations: OrganisationsTable
  memberships: MembershipsTable
  invitations: InvitationsTable
  password_resets: PasswordResetsTable
  sign_in_failures: SignInFailuresTable
  sites: SitesTable
  assets: AssetsTable
  register_imports: RegisterImportsTable
  register_import_rows: RegisterImportRowsTable
  instruments: InstrumentsTable
  surfaces: SurfacesTable
  routes: RoutesTable
  route_stops: RouteStopsTable
  organisation_billing: OrganisationBillingTable
  stripe_events: StripeEventsTable
  billing_invoices: BillingInvoicesTable
  surveys: SurveysTable
  survey_sites: SurveySitesTable
  checks: ChecksTable
  findings: FindingsTable
  temperature_grids: TemperatureGridsTable
  attachments: AttachmentsTable
  idempotency_keys: IdempotencyKeysTable
  notices: NoticesTable
  notice_preferences: NoticePreferencesTable
  outbox: OutboxTable
  job_runs: JobRunsTable
  work_orders: WorkOrdersTable
  work_order_findings: WorkOrderFindingsTable
  work_order_assignees: WorkOrderAssigneesTable
  verifications: VerificationsTable
  record_events: RecordEventsTable
  survey_reports: SurveyReportsTable
  api_tokens: ApiTokensTable
  api_token_requests: ApiTokenRequestsTable
  api_token_windows: ApiTokenWindowsTable
  audit_events: AuditEventsTable
  account_events: AccountEventsTable
}
