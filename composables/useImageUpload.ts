import { attachmentBeginSchema, type AttachmentKind } from '#shared/schemas/attachment'
import type { Attachment, AttachmentUploadTicket } from '#shared/types/attachment'
import { apiErrorOf } from '#shared/utils/field-errors'

export type ImageUploadState = 'starting' | 'sending' | 'checking' | 'done' | 'failed'

/** One image on its way: begun on the server, sent straight to storage, then checked by the server. */
export interface ImageUpload {
  key: string
  file: File
  kind: AttachmentKind
  state: ImageUploadState
  /** Percentage of the bytes sent (0–100). */
  progress: number
  message: string
  /** Whether Retry can help (a lost connection) or the image itself was refused (choose another). */
  retryable: boolean
  ticket: AttachmentUploadTicket | null
  /** The bytes reached storage; a retry then only asks the server to check them again. */
  sent: boolean
}

class UploadInterrupted extends Error {}

/** PUTs the file to the presigned URL with XMLHttpRequest, which (unlike fetch) reports upload progress. */
function putFile(item: ImageUpload, ticket: AttachmentUploadTicket): Promise<void> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open(ticket.method, ticket.uploadUrl)
    for (const [k, v] of Object.entries(ticket.headers)) xhr.setRequestHeader(k, v)
    xhr.timeout = 10 * 60 * 1000
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) item.progress = Math.min(99, Math.round((e.loaded / e.total) * 100))
    }
    xhr.onload = () => (xhr.status >= 200 && xhr.status < 300 ? resolve() : reject(new UploadInterrupted(`storage answered ${xhr.status}`)))
    xhr.onerror = () => reject(new UploadInterrupted('the connection was lost'))
    xhr.ontimeout = () => reject(new UploadInterrupted('it took too long'))
    xhr.onabort = () => reject(new UploadInterrupted('it was stopped'))
    xhr.send(item.file)
  })
}

/**
 * Uploads images to one subject's attachments (`base` = e.g. /api/orgs/<slug>/findings/<id>/attachments).
 * The subject itself is already saved, so a failed upload never touches it: the image waits here with a Retry.
 */
export function useImageUpload(base: MaybeRefOrGetter<string>, onStored: (a: Attachment) => void) {
  const uploads = ref<ImageUpload[]>([])
  let seq = 0

  function fail(item: ImageUpload, message: string, retryable: boolean) {
    item.state = 'failed'
    item.message = message
    item.retryable = retryable
  }

  async function run(item: ImageUpload) {
    const url = toValue(base)
    item.message = ''
    item.retryable = false
    try {
      if (!item.ticket || Date.parse(item.ticket.expiresAt) < Date.now() + 30_000) {
        item.state = 'starting'
        item.progress = 0
        item.sent = false
        item.ticket = await $fetch<AttachmentUploadTicket>(url, {
          method: 'POST',
          body: { kind: item.kind, fileName: item.file.name, contentType: item.file.type, sizeBytes: item.file.size },
        })
      }
      if (!item.sent) {
        item.state = 'sending'
        await putFile(item, item.ticket)
        item.sent = true
      }
      item.state = 'checking'
      const stored = await $fetch<Attachment>(`${url}/${item.ticket.attachment.id}/complete`, { method: 'POST' })
      item.progress = 100
      item.state = 'done'
      onStored(stored)
    } catch (err) {
      if (err instanceof UploadInterrupted) {
        fail(item, `The image did not finish uploading (${err.message}). The finding is saved; press Retry when the connection is back.`, true)
        return
      }
      const e = apiErrorOf(err)
      if (e.statusCode === 503) {
        // The database or file storage is away for a moment: the server says which.
        fail(item, `${e.message} The finding is saved; press Retry.`, true)
      } else if (!e.statusCode || e.statusCode >= 500 || e.statusCode === 408) {
        fail(item, 'No answer from the server. The finding is saved; press Retry when the connection is back.', true)
      } else if (e.statusCode === 409 && /not arrived/.test(e.message)) {
        item.sent = false
        fail(item, e.message, true)
      } else {
        // Refused (type, size, content) or not allowed: retrying the same file cannot help.
        item.ticket = null
        fail(item, Object.values(e.fieldErrors)[0]?.[0] ?? e.message, false)
      }
    }
  }

  /** Queues files and starts them; files the shared rules refuse fail at once with the reason. */
  function add(files: File[], kind: AttachmentKind) {
    for (const file of files) {
      uploads.value.push({ key: `u${++seq}`, file: markRaw(file), kind, state: 'starting', progress: 0, message: '', retryable: false, ticket: null, sent: false })
      const item = uploads.value[uploads.value.length - 1]!
      const check = attachmentBeginSchema.safeParse({ kind, fileName: file.name, contentType: file.type, sizeBytes: file.size })
      if (!check.success) fail(item, `${file.name}: ${check.error.issues[0]?.message ?? 'this file cannot be attached.'}`, false)
      else void run(item)
    }
  }

  function retry(key: string) {
    const item = uploads.value.find((u) => u.key === key)
    if (item && item.state === 'failed' && item.retryable) void run(item)
  }

  function dismiss(key: string) {
    uploads.value = uploads.value.filter((u) => u.key !== key)
  }

  return { uploads, add, retry, dismiss }
}
