import type { AttachmentContentType, AttachmentKind, AttachmentState, AttachmentSubjectKind } from '../schemas/attachment'

// API objects of attachments (camelCase). URLs are short-lived presigned links to object storage.

export interface Attachment {
  id: string
  subjectKind: AttachmentSubjectKind
  subjectId: string
  kind: AttachmentKind
  fileName: string
  contentType: AttachmentContentType
  sizeBytes: number
  state: AttachmentState
  refusedReason: string | null
  uploadedBy: { id: string; name: string } | null
  createdAt: string
  storedAt: string | null
  /** Presigned GET of the ~320 px JPEG thumbnail (stored images only). */
  thumbnailUrl: string | null
  /** Presigned GET of the original image (stored images only). */
  fullUrl: string | null
}

/** What the browser needs to send the bytes: PUT `file` to `uploadUrl` with exactly these headers, then call complete. */
export interface AttachmentUploadTicket {
  attachment: Attachment
  uploadUrl: string
  method: 'PUT'
  headers: Record<string, string>
  expiresAt: string
}
