import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { Role } from '../../shared/permissions'

export interface MembershipsTable {
  organisation_id: string
  user_id: string
  role: Role
  removed_at: Date | null
  /** The thermographer's qualification as recorded by the organisation; printed on survey reports. */
  qualification: Generated<string>
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Membership = Selectable<MembershipsTable>
export type NewMembership = Insertable<MembershipsTable>
export type MembershipUpdate = Updateable<MembershipsTable>
