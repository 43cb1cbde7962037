import { parseCsv, splitCsv } from '#shared/csv'
import { IMPORT_CHUNK_MAX_CHARS } from '#shared/schemas/register'
import type { ImportSummary } from '#shared/types/register'
import { apiErrorOf } from '#shared/utils/field-errors'

/** Characters per upload request: small enough to show steady progress, large enough to keep requests few. */
const PIECE_CHARS = 256 * 1024
const RETRIES = 3

export type ImportStage = 'idle' | 'reading' | 'uploading' | 'checking' | 'checked' | 'committing' | 'committed' | 'failed'

/**
 * Sends a CSV file to an import session in pieces (cut at record boundaries by the shared parser), with progress,
 * then asks the server to check it and, on request, to commit it. A piece whose request fails for a network
 * reason is sent again; the server takes a repeated piece once.
 */
export function useRegisterImport(org: Readonly<Ref<string | null>>) {
  const stage = ref<ImportStage>('idle')
  const sentChars = ref(0)
  const totalChars = ref(0)
  const piece = ref(0)
  const pieces = ref(0)
  const summary = ref<ImportSummary | null>(null)
  const message = ref('')
  const orgAccess = useOrgAccess()

  const percent = computed(() => (totalChars.value ? Math.round((sentChars.value / totalChars.value) * 100) : 0))
  const base = () => `/api/orgs/${org.value}/register-imports`

  function fail(err: unknown) {
    const e = apiErrorOf(err)
    message.value = e.message
    if (e.statusCode === 403) orgAccess.report(e.message)
    stage.value = 'failed'
  }

  async function send<T>(url: string, body?: unknown): Promise<T> {
    for (let attempt = 1; ; attempt++) {
      try {
        return await $fetch<T>(url, { method: 'POST', body: body ?? {} })
      } catch (err) {
        const status = apiErrorOf(err).statusCode
        // Only a lost connection or a server hiccup is worth another try; a refusal is final.
        if (attempt >= RETRIES || (status !== undefined && status < 500)) throw err
        await new Promise((r) => setTimeout(r, 500 * attempt))
      }
    }
  }

  async function upload(kind: 'sites' | 'assets', file: File) {
    message.value = ''
    summary.value = null
    sentChars.value = 0
    stage.value = 'reading'
    try {
      const text = await file.text()
      if (!text.length) {
        message.value = 'The file is empty.'
        stage.value = 'failed'
        return
      }
      // Bytes that are not UTF-8 decode to U+FFFD: the file was saved in an older encoding, and accents would be lost.
      if (text.includes('\uFFFD')) {
        message.value = 'The file is not in UTF-8, so some letters cannot be read. In your spreadsheet, save it as "CSV UTF-8" and upload it again.'
        stage.value = 'failed'
        return
      }
      const parts = splitCsv(text, PIECE_CHARS)
      // A piece can only outgrow the limit when one record never ends, almost always a quote left open.
      if (parts.some((p) => p.length > IMPORT_CHUNK_MAX_CHARS)) {
        const first = parseCsv(text).errors[0]
        message.value = first ? `Row ${first.record}: ${first.message}` : 'One row of the file is too long to read. Check it for a double quote (") that is never closed.'
        stage.value = 'failed'
        return
      }
      totalChars.value = text.length
      pieces.value = parts.length
      const created = await send<ImportSummary>(base(), { kind, fileName: file.name, totalChars: text.length })
      stage.value = 'uploading'
      for (const [seq, part] of parts.entries()) {
        piece.value = seq + 1
        summary.value = await send<ImportSummary>(`${base()}/${created.id}/chunks`, { seq, text: part })
        sentChars.value += part.length
      }
      stage.value = 'checking'
      summary.value = await send<ImportSummary>(`${base()}/${created.id}/check`)
      stage.value = 'checked'
    } catch (err) {
      fail(err)
    }
  }

  async function commit() {
    if (!summary.value) return
    stage.value = 'committing'
    message.value = ''
    try {
      summary.value = await $fetch<ImportSummary>(`${base()}/${summary.value.id}/commit`, { method: 'POST' })
      stage.value = 'committed'
    } catch (err) {
      const data = (err as { data?: { data?: { summary?: ImportSummary } } }).data?.data
      if (data?.summary) summary.value = data.summary
      message.value = apiErrorOf(err).message
      stage.value = data?.summary ? 'checked' : 'failed'
    }
  }

  function reset() {
    stage.value = 'idle'
    summary.value = null
    message.value = ''
    sentChars.value = 0
  }

  return { stage, sentChars, totalChars, percent, piece, pieces, summary, message, upload, commit, reset }
}
