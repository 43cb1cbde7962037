import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** A file (image) attached to a finding or a work order; the bytes live in object storage, the row is never deleted. */
export interface AttachmentsTable {
  id: Generated<string>
  organisation_id: string
  subject_kind: 'finding' | 'work_order'
  subject_id: string
  kind: 'infrared' | 'visible' | 'repair'
  file_name: string
  content_type: 'image/jpeg' | 'image/png'
  /** bigint: pg returns it as a string. */
  size_bytes: ColumnType<string, number, number>
  object_key: string
  thumbnail_key: string | null
  state: Generated<'pending' | 'stored' | 'refused'>
  refused_reason: string | null
  uploaded_by: string | null
  created_at: ColumnType<Date, never, never>
  stored_at: Date | null
  archived_at: Date | null
}
export type AttachmentRow = Selectable<AttachmentsTable>
export type NewAttachment = Insertable<AttachmentsTable>
export type AttachmentUpdate = Updateable<AttachmentsTable>
