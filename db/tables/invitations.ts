import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { Role } from '../../shared/permissions'

export interface InvitationsTable {
  id: Generated<string>
  organisation_id: string
  email: string
  role: Role
  token_hash: string
  invited_by: string | null
  status: Generated<'pending' | 'accepted' | 'revoked'>
  expires_at: ColumnType<Date, Date | string, Date | string>
  sent_count: Generated<number>
  last_sent_at: ColumnType<Date, Date | string | undefined, Date | string>
  accepted_by: string | null
  accepted_at: Date | null
  revoked_at: Date | null
  created_at: ColumnType<Date, never, never>
}
export type Invitation = Selectable<InvitationsTable>
export type NewInvitation = Insertable<InvitationsTable>
export type InvitationUpdate = Updateable<InvitationsTable>
