import type { UsersTable } from './tables/users'
import type { OrganisationsTable } from './tables/organisations'
import type { MembershipsTable } from './tables/memberships'
import type { InvitationsTable } from './tables/invitations'
import type { PasswordResetsTable } from './tables/password-resets'
import type { SignInFailuresTable } from './tables/sign-in-failures'
import type { SitesTable } from './tables/sites'
import type { AssetsTable } from './tables/assets'

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
}
