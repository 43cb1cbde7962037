import { randomUUID } from 'node:crypto'
import { fileTypeFromBuffer } from 'file-type'
import sharp from 'sharp'
import type { AttachmentRow } from '~~/db/tables/attachments'
import {
  ATTACHMENT_KIND_LABELS,
  ATTACHMENT_TYPE_LABELS,
  MAX_ATTACHMENT_BYTES,
  formatBytes,
  type AttachmentBeginInput,
  type AttachmentContentType,
  type AttachmentKind,
  type AttachmentSubjectKind,
} from '#shared/schemas/attachment'
import type { Attachment, AttachmentUploadTicket } from '#shared/types/attachment'
import { assertStorageRoom } from './plan-limits'
import { record } from './audit'

// Generic attachments: images on a finding or a work order, sent by the browser straight to object storage through a
// presigned PUT, then checked here by their real size and content before they count. The subject's own rules (who may
// add files, when) stay with the subject: callers pass them in as `check`.

/** The thing files are attached to. `id` must already be a validated uuid from the route. */
export interface AttachmentSubject {
  kind: AttachmentSubjectKind
  id: string
}

/**
 * The subject's rule, run before anything is read or written: throw 404 (notFound) when the subject is not this
 * organisation's, 403 when the person may not do this, 409 when the subject's state forbids it. Every query inside it
 * must carry `organisation_id = ctx.org.id`.
 */
export type AttachmentCheck = () => Promise<void>

export interface AttachmentWriteOptions {
  /** Who may add files to this subject now (e.g. the assigned thermographer while the survey is being recorded). */
  check: AttachmentCheck
  /** The kinds this subject accepts (findings: infrared, visible; work orders: repair, visible). */
  kinds: readonly AttachmentKind[]
}

/** How long the browser has to send the bytes. */
const UPLOAD_URL_SECONDS = 15 * 60
/** How long a list's image links stay valid (a page left open re-fetches the list). */
const VIEW_URL_SECONDS = 15 * 60
/** How long the redirect to the full image stays valid. */
const REDIRECT_URL_SECONDS = 60
/** Thumbnail box (px): shown at ~96–160 CSS px, sharp on a 2× phone screen. */
const THUMBNAIL_PX = 320
/** Enough leading bytes for file-type to recognise JPEG and PNG (and most formats people pick by mistake). */
const SNIFF_BYTES = 4100

function extensionOf(type: AttachmentContentType): string {
  return type === 'image/png' ? 'png' : 'jpg'
}

function toAttachment(r: AttachmentRow & { uploader_name?: string | null }, urls: { thumbnailUrl: string | null; fullUrl: string | null }): Attachment {
  return {
    id: r.id,
    subjectKind: r.subject_kind,
    subjectId: r.subject_id,
    kind: r.kind,
    fileName: r.file_name,
    contentType: r.content_type,
    sizeBytes: Number(r.size_bytes),
    state: r.state,
    refusedReason: r.refused_reason,
    uploadedBy: r.uploaded_by ? { id: r.uploaded_by, name: r.uploader_name ?? '—' } : null,
    createdAt: r.created_at.toISOString(),
    storedAt: r.stored_at ? r.stored_at.toISOString() : null,
    ...urls,
  }
}

async function withUrls(r: AttachmentRow & { uploader_name?: string | null }, expiresIn = VIEW_URL_SECONDS): Promise<Attachment> {
  if (r.state !== 'stored') return toAttachment(r, { thumbnailUrl: null, fullUrl: null })
  const [thumbnailUrl, fullUrl] = await Promise.all([
    r.thumbnail_key ? presignGet(r.thumbnail_key, { expiresIn }) : Promise.resolve(null),
    presignGet(r.object_key, { expiresIn }),
  ])
  return toAttachment(r, { thumbnailUrl, fullUrl })
}

function rowsQuery(orgId: string) {
  return useDb().selectFrom('attachments as at')
    .leftJoin('users as u', 'u.id', 'at.uploaded_by')
    .selectAll('at').select('u.name as uploader_name')
    .where('at.organisation_id', '=', orgId)
    .where('at.archived_at', 'is', null)
}

/** One attachment of the subject (any state); 404 when it is not this organisation's or not under this subject. */
async function findRow(ctx: MemberContext, subject: AttachmentSubject, attachmentId: string) {
  const row = await rowsQuery(ctx.org.id)
    .where('at.id', '=', attachmentId).where('at.subject_kind', '=', subject.kind).where('at.subject_id', '=', subject.id)
    .executeTakeFirst()
  if (!row) throw notFound('Image')
  return row
}

/**
 * Step 1: records a pending attachment and returns a presigned PUT URL for its bytes. The declared type and size are
 * refused here (400 with a field message) before anything is presigned; the real ones are checked at completion.
 */
export async function beginAttachmentUpload(
  ctx: MemberContext,
  subject: AttachmentSubject,
  input: AttachmentBeginInput,
  opts: AttachmentWriteOptions,
): Promise<AttachmentUploadTicket> {
  await opts.check()
  if (!opts.kinds.includes(input.kind)) {
    fieldError('kind', `Choose ${opts.kinds.map((k) => ATTACHMENT_KIND_LABELS[k].toLowerCase()).join(' or ')}.`)
  }
  await assertStorageRoom(useDb(), ctx.org.id, input.sizeBytes)
  const id = randomUUID()
  // The key holds only ids and a fixed extension: the person's file name never reaches the object store.
  const objectKey = tenantKey(ctx.org.id, 'attachments', id, `original.${extensionOf(input.contentType)}`)
  const row = await useDb().insertInto('attachments').values({
    id,
    organisation_id: ctx.org.id,
    subject_kind: subject.kind,
    subject_id: subject.id,
    kind: input.kind,
    file_name: input.fileName,
    content_type: input.contentType,
    size_bytes: input.sizeBytes,
    object_key: objectKey,
    thumbnail_key: null,
    refused_reason: null,
    uploaded_by: ctx.user.id,
    stored_at: null,
    archived_at: null,
  }).returningAll().executeTakeFirstOrThrow()
  const uploadUrl = await presignPut(objectKey, input.contentType, UPLOAD_URL_SECONDS)
  return {
    attachment: toAttachment({ ...row, uploader_name: ctx.user.name }, { thumbnailUrl: null, fullUrl: null }),
    uploadUrl,
    method: 'PUT',
    headers: { 'Content-Type': input.contentType },
    expiresAt: new Date(Date.now() + UPLOAD_URL_SECONDS * 1000).toISOString(),
  }
}

/** 400 for an upload whose bytes are not acceptable; the object is deleted and the row kept as refused, with the reason. */
async function refuse(ctx: MemberContext, row: AttachmentRow, reason: string): Promise<never> {
  await deleteObject(row.object_key).catch(() => undefined)
  await useDb().updateTable('attachments').set({ state: 'refused', refused_reason: reason })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', row.id).where('state', '=', 'pending')
    .execute()
  throw createError({ statusCode: 400, statusMessage: 'Image refused', data: { message: reason, fieldErrors: { file: [reason] } } })
}

/**
 * Step 2, after the browser's PUT: checks the stored object's real size (HEAD) and real type (its first bytes, by
 * content), makes a ~320 px JPEG thumbnail beside it and marks the attachment stored. Anything unacceptable is refused:
 * the object is deleted, the row marked refused with the reason, and a 400 carries the same reason. Calling it again
 * on a stored attachment returns it unchanged.
 */
export async function completeAttachmentUpload(
  ctx: MemberContext,
  subject: AttachmentSubject,
  attachmentId: string,
  opts: Pick<AttachmentWriteOptions, 'check'>,
): Promise<Attachment> {
  await opts.check()
  const row = await findRow(ctx, subject, attachmentId)
  if (row.uploaded_by !== ctx.user.id) {
    throw createError({ statusCode: 403, statusMessage: 'Not your upload', data: { message: 'Only the person who started this upload can finish it.' } })
  }
  if (row.state === 'stored') return withUrls(row)
  if (row.state === 'refused') {
    throw createError({ statusCode: 409, statusMessage: 'Image refused', data: { message: `This upload was refused: ${row.refused_reason} Choose the image again to start a new upload.` } })
  }
  const head = await headObject(row.object_key)
  if (!head) {
    // Kept pending: the PUT may still be on its way, or may be sent again with the same URL.
    throw createError({ statusCode: 409, statusMessage: 'Not uploaded yet', data: { message: 'The image has not arrived in storage yet: the upload did not finish. Send it again.' } })
  }
  const declared = Number(row.size_bytes)
  if (head.size === 0) return refuse(ctx, row, 'The stored file is empty (0 bytes). Choose the image again.')
  if (head.size > MAX_ATTACHMENT_BYTES) {
    return refuse(ctx, row, `The stored file is ${formatBytes(head.size)}; images can be at most ${formatBytes(MAX_ATTACHMENT_BYTES)}.`)
  }
  if (head.size !== declared) {
    return refuse(ctx, row, `The stored file is ${head.size} bytes but ${declared} bytes were declared. Choose the image again.`)
  }
  // Storage serves an object under the type it was sent with; a store that does not hold the PUT to the signed type
  // could otherwise serve these bytes as, say, text/html.
  if (head.contentType !== row.content_type) {
    const sent = (head.contentType ?? 'no type').slice(0, 100)
    return refuse(ctx, row, `The file was sent as ${sent}, not as the declared ${ATTACHMENT_TYPE_LABELS[row.content_type]}. Choose the image again.`)
  }
  const start = await getObjectBytes(row.object_key, `bytes=0-${SNIFF_BYTES - 1}`)
  const sniffed = start ? await fileTypeFromBuffer(start) : undefined
  const declaredLabel = ATTACHMENT_TYPE_LABELS[row.content_type]
  if (!sniffed || (sniffed.mime !== 'image/jpeg' && sniffed.mime !== 'image/png')) {
    const seen = sniffed ? `it looks like ${sniffed.ext.toUpperCase()}` : 'it looks like text or an unknown format'
    return refuse(ctx, row, `The file is not a JPEG or PNG image by its content (${seen}), although it was declared as ${declaredLabel}.`)
  }
  if (sniffed.mime !== row.content_type) {
    const realLabel = ATTACHMENT_TYPE_LABELS[sniffed.mime as AttachmentContentType]
    return refuse(ctx, row, `The file's content is ${realLabel} but it was declared as ${declaredLabel}. Choose the image again.`)
  }
  const bytes = await getObjectBytes(row.object_key)
  if (!bytes || bytes.length !== head.size) {
    throw createError({ statusCode: 409, statusMessage: 'Changed meanwhile', data: { message: 'The image changed in storage while it was being checked. Send it again.' } })
  }
  let thumbnail: Buffer
  try {
    // rotate() applies the camera's orientation tag; a bounded pixel count keeps a crafted image from exhausting memory.
    thumbnail = await sharp(bytes, { limitInputPixels: 120_000_000 })
      .rotate()
      .resize({ width: THUMBNAIL_PX, height: THUMBNAIL_PX, fit: 'inside', withoutEnlargement: true })
      .flatten({ background: '#ffffff' })
      .jpeg({ quality: 75 })
      .toBuffer()
  } catch {
    return refuse(ctx, row, `The image could not be read (the ${declaredLabel} data may be damaged or incomplete). Choose it again.`)
  }
  const thumbnailKey = tenantKey(ctx.org.id, 'attachments', row.id, 'thumbnail.jpg')
  await putObject(thumbnailKey, thumbnail, 'image/jpeg')
  await useDb().updateTable('attachments')
    .set({ state: 'stored', stored_at: new Date(), thumbnail_key: thumbnailKey, size_bytes: head.size })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', row.id).where('state', '=', 'pending')
    .execute()
  return withUrls(await findRow(ctx, subject, attachmentId))
}

/** The stored images of one subject, oldest first, with presigned thumbnail and full-size links. */
export async function listAttachments(ctx: MemberContext, subject: AttachmentSubject, opts: { check: AttachmentCheck }): Promise<Attachment[]> {
  await opts.check()
  const rows = await rowsQuery(ctx.org.id)
    .where('at.subject_kind', '=', subject.kind).where('at.subject_id', '=', subject.id).where('at.state', '=', 'stored')
    .orderBy('at.created_at').orderBy('at.id')
    .execute()
  return Promise.all(rows.map((r) => withUrls(r)))
}

/**
 * Stored images of many subjects of one kind at once (for lists that show thumbnails), keyed by subject id. The caller
 * has checked the person may read these subjects; ids of other organisations simply find nothing.
 */
export async function listAttachmentsFor(ctx: MemberContext, kind: AttachmentSubjectKind, subjectIds: string[]): Promise<Record<string, Attachment[]>> {
  const out: Record<string, Attachment[]> = Object.fromEntries(subjectIds.map((id) => [id, [] as Attachment[]]))
  if (!subjectIds.length) return out
  const rows = await rowsQuery(ctx.org.id)
    .where('at.subject_kind', '=', kind).where('at.subject_id', 'in', subjectIds).where('at.state', '=', 'stored')
    .orderBy('at.created_at').orderBy('at.id')
    .execute()
  for (const a of await Promise.all(rows.map((r) => withUrls(r)))) out[a.subjectId]!.push(a)
  return out
}

/** A short-lived presigned GET for a stored image (full size or thumbnail); 404 for anything else. */
export async function attachmentFileUrl(
  ctx: MemberContext,
  subject: AttachmentSubject,
  attachmentId: string,
  variant: 'full' | 'thumbnail',
  opts: { check: AttachmentCheck },
): Promise<string> {
  await opts.check()
  const row = await findRow(ctx, subject, attachmentId)
  if (row.state !== 'stored') throw notFound('Image')
  const key = variant === 'thumbnail' && row.thumbnail_key ? row.thumbnail_key : row.object_key
  return presignGet(key, { expiresIn: REDIRECT_URL_SECONDS })
}

/**
 * Takes a stored image off its subject (a wrong photo): the row is archived, never deleted, and the objects stay in
 * storage as part of the record. Archiving again finds nothing (404).
 */
export async function archiveAttachment(
  ctx: MemberContext,
  subject: AttachmentSubject,
  attachmentId: string,
  opts: Pick<AttachmentWriteOptions, 'check'>,
): Promise<void> {
  await opts.check()
  const row = await findRow(ctx, subject, attachmentId)
  if (row.state !== 'stored') throw notFound('Image')
  await useDb().transaction().execute(async (trx) => {
    const archived = await trx.updateTable('attachments').set({ archived_at: new Date() })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', row.id).where('archived_at', 'is', null)
      .returning('id').executeTakeFirst()
    if (archived) {
      await record(trx, {
        ctx, action: 'image.removed', target: { kind: 'attachment', id: row.id, label: row.file_name },
        details: { subjectKind: subject.kind, subjectId: subject.id, kind: row.kind },
      })
    }
  })
}
