import { z } from 'zod'

// Images attached to findings and work orders: one set of rules for the server and the upload widget.

export const ATTACHMENT_SUBJECT_KINDS = ['finding', 'work_order'] as const
export type AttachmentSubjectKind = (typeof ATTACHMENT_SUBJECT_KINDS)[number]

export const ATTACHMENT_KINDS = ['infrared', 'visible', 'repair'] as const
export type AttachmentKind = (typeof ATTACHMENT_KINDS)[number]

/** Plain labels for the kinds of image. */
export const ATTACHMENT_KIND_LABELS: Record<AttachmentKind, string> = {
  infrared: 'Infrared',
  visible: 'Visible light',
  repair: 'Repair photo',
}

export const ATTACHMENT_STATES = ['pending', 'stored', 'refused'] as const
export type AttachmentState = (typeof ATTACHMENT_STATES)[number]

/** The image types accepted, checked again by content on the server once the bytes are stored. */
export const ATTACHMENT_CONTENT_TYPES = ['image/jpeg', 'image/png'] as const
export type AttachmentContentType = (typeof ATTACHMENT_CONTENT_TYPES)[number]
export const ATTACHMENT_TYPE_LABELS: Record<AttachmentContentType, string> = { 'image/jpeg': 'JPEG', 'image/png': 'PNG' }

/** Largest image accepted: 25 MB (MiB), enough for a radiometric JPEG or a phone photo at full resolution. */
export const MAX_ATTACHMENT_BYTES = 25 * 1024 * 1024
/** Longest file name kept (characters); longer names keep their start and their extension. */
export const MAX_FILE_NAME_CHARS = 120

/** Size in plain words (kB / MB, 1024-based like the limit). */
export function formatBytes(n: number): string {
  if (n < 1024) return `${n} bytes`
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(0)} kB`
  return `${(n / 1024 / 1024).toFixed(1)} MB`
}

/**
 * A file name safe to store and show: the last path part only (a name cannot climb folders), no control or
 * direction-override characters, no leading dots, at most MAX_FILE_NAME_CHARS characters keeping the extension.
 * The name is only ever shown and offered on download; object keys never contain it.
 */
export function sanitiseFileName(raw: string): string {
  // eslint-disable-next-line no-control-regex
  const noControls = raw.replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, '')
  const last = noControls.split(/[/\\]/).filter((p) => p.trim() !== '').pop() ?? ''
  let name = last.replace(/\s+/g, ' ').trim().replace(/^[.\s]+/, '').replace(/[:*?"<>|]/g, '_')
  if (name.length > MAX_FILE_NAME_CHARS) {
    const dot = name.lastIndexOf('.')
    const ext = dot > 0 && name.length - dot <= 10 ? name.slice(dot) : ''
    name = name.slice(0, MAX_FILE_NAME_CHARS - ext.length).trimEnd() + ext
  }
  return name || 'image'
}

/** Asking to upload one image: what it is, its name, declared type and size. */
export const attachmentBeginSchema = z.object({
  kind: z.enum(ATTACHMENT_KINDS, { error: 'Choose infrared or visible light.' }),
  fileName: z.string({ error: 'The file needs a name.' }).max(1000, 'The file name is too long.').transform(sanitiseFileName),
  contentType: z.enum(ATTACHMENT_CONTENT_TYPES, { error: 'Only JPEG or PNG images can be attached.' }),
  sizeBytes: z.number({ error: 'The file size is missing.' }).int('The file size is missing.')
    .min(1, 'This file is empty (0 bytes): choose the image again.')
    .max(MAX_ATTACHMENT_BYTES, `Images can be at most ${MAX_ATTACHMENT_BYTES / 1024 / 1024} MB; this one is larger.`),
})
export type AttachmentBeginInput = z.output<typeof attachmentBeginSchema>

/** Route parameters of an attachment under its subject (finding or work order). */
export const attachmentParamsSchema = z.object({
  org: z.string().min(1),
  id: z.uuid(),
  attachmentId: z.uuid(),
})

/** Which rendition of an image to open. */
export const attachmentFileQuerySchema = z.object({
  variant: z.enum(['full', 'thumbnail']).default('full'),
})

/** Several subjects at once (for lists showing thumbnails): ?ids=a,b,c, at most 100. */
export const attachmentBatchQuerySchema = z.object({
  ids: z.string().max(4000).transform((s) => [...new Set(s.split(',').map((x) => x.trim()).filter(Boolean))])
    .pipe(z.array(z.uuid('Not a valid id.')).max(100, 'Ask for at most 100 at once.')),
})
