import { defineStore } from 'pinia'
import { createStore, del, set, values, type UseStore } from 'idb-keyval'
import { apiErrorOf } from '#shared/utils/field-errors'

// Field records (checks, findings, site conditions) saved on a phone with a poor connection. Each is written to the
// device (IndexedDB) the moment the person presses save, with an Idempotency-Key made then, and sent in order when
// the connection allows. The server answers a repeat of the same key with its first answer, so a record sent twice
// (a reply lost on the way back, two retries at once) is stored once. Nothing typed is dropped: a record the server
// refuses stays here, with the server's message beside it, until the person fixes it or discards it.

export type FieldRecordKind = 'check' | 'finding' | 'conditions'

export interface FieldRecord {
  /** The Idempotency-Key, made when the person pressed save. */
  key: string
  kind: FieldRecordKind
  org: string
  surveyId: string
  /** The asset (check, finding) or site (conditions) it is about, for showing it beside that item. */
  subjectId: string
  /** Plain words for the list: "Clear · T1", "Finding · T1 · line-side lug". */
  label: string
  url: string
  body: Record<string, unknown>
  createdAt: string
  state: 'waiting' | 'sending' | 'refused'
  attempts: number
  /** The server's refusal (e.g. a field error), kept so the person can fix the record. */
  error: { message: string; fieldErrors: Record<string, string[]>; statusCode?: number } | null
}

export type SendOutcome<T = unknown> =
  | { state: 'sent'; data: T }
  | { state: 'waiting' }
  | { state: 'refused'; error: NonNullable<FieldRecord['error']> }

const DB_NAME = 'greybody-field'
const STORE_NAME = 'records'

// Opened on first use, in the browser only (the store module is also loaded during server rendering).
let idbStore: UseStore | null = null
function device() {
  idbStore ??= createStore(DB_NAME, STORE_NAME)
  return idbStore
}
/** Runs an IndexedDB operation; null when the browser refuses (no IndexedDB, private mode, quota). */
async function onDevice<T>(op: (store: UseStore) => Promise<T>): Promise<T | null> {
  try {
    return await op(device())
  } catch {
    return null
  }
}

/** Answers that mean "try later" rather than "this record is wrong": no answer at all, a server hiccup, a claim in flight. */
function isTransient(statusCode: number | undefined, statusMessage?: string): boolean {
  if (statusCode === undefined || statusCode === 0) return true
  if (statusCode >= 500 || statusCode === 408 || statusCode === 429 || statusCode === 401) return true
  return statusCode === 409 && statusMessage === 'Still being saved'
}

const plain = (r: FieldRecord): FieldRecord => JSON.parse(JSON.stringify(r))

/** A random UUID v4 for an Idempotency-Key; crypto.randomUUID needs HTTPS, getRandomValues works everywhere. */
export function newRecordKey(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID()
  const b = crypto.getRandomValues(new Uint8Array(16))
  b[6] = (b[6]! & 0x0f) | 0x40
  b[8] = (b[8]! & 0x3f) | 0x80
  const h = [...b].map((x) => x.toString(16).padStart(2, '0')).join('')
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`
}
// The last outcome of each record sent in this session, so save() can tell its caller what happened.
const outcomes = new Map<string, SendOutcome>()
// A request that hangs (one bar of signal) is given up after this long and tried again later.
const SEND_TIMEOUT_MS = 20_000

export const useFieldQueueStore = defineStore('field-queue', {
  state: () => ({
    records: [] as FieldRecord[],
    loaded: false,
    flushing: false,
    online: true,
    lastError: '' as string,
    /** Set when this browser will not keep records (no IndexedDB, e.g. some private modes): they live in memory only. */
    deviceUnavailable: false,
  }),
  getters: {
    forSurvey: (s) => (surveyId: string) => s.records.filter((r) => r.surveyId === surveyId),
    waitingCount: (s) => (surveyId: string) => s.records.filter((r) => r.surveyId === surveyId && r.state !== 'refused').length,
    refusedCount: (s) => (surveyId: string) => s.records.filter((r) => r.surveyId === surveyId && r.state === 'refused').length,
  },
  actions: {
    /** Reads what an earlier visit left on the device (client only). */
    async load() {
      if (import.meta.server || this.loaded) return
      this.online = navigator.onLine
      const kept = await onDevice((store) => values<FieldRecord>(store))
      if (kept === null) this.deviceUnavailable = true
      const saved = (kept ?? []).map((r) => ({ ...r, state: r.state === 'sending' ? 'waiting' : r.state }) as FieldRecord)
      // Keep anything added meanwhile; sort by when the person pressed save, so records go out in that order.
      const known = new Set(this.records.map((r) => r.key))
      this.records = [...this.records, ...saved.filter((r) => !known.has(r.key))].sort((a, b) => a.createdAt.localeCompare(b.createdAt))
      this.loaded = true
    },

    async persist(r: FieldRecord) {
      if ((await onDevice((store) => set(r.key, plain(r), store).then(() => true))) === null) this.deviceUnavailable = true
    },

    async forget(key: string) {
      this.records = this.records.filter((r) => r.key !== key)
      if ((await onDevice((store) => del(key, store).then(() => true))) === null) this.deviceUnavailable = true
    },

    /**
     * Keeps a record on the device, then sends it (and anything waiting before it) if the connection allows.
     * Returns what happened to this record.
     */
    async save<T = unknown>(input: Omit<FieldRecord, 'key' | 'createdAt' | 'state' | 'attempts' | 'error'> & { key?: string }): Promise<SendOutcome<T>> {
      await this.load()
      const record: FieldRecord = {
        ...input,
        key: input.key ?? newRecordKey(),
        createdAt: new Date().toISOString(),
        state: 'waiting',
        attempts: 0,
        error: null,
      }
      const existing = this.records.findIndex((r) => r.key === record.key)
      if (existing >= 0) {
        // A fixed record keeps its key and its place in the queue (the server stored nothing for the refused one).
        record.createdAt = this.records[existing]!.createdAt
        this.records.splice(existing, 1, record)
      } else {
        this.records.push(record)
      }
      await this.persist(record)
      outcomes.delete(record.key)
      // Through the queue, so records reach the server in the order they were saved (a check before its finding).
      await this.flush()
      const out = outcomes.get(record.key)
      if (out) return out as SendOutcome<T>
      const now = this.records.find((r) => r.key === record.key)
      return now?.state === 'refused' && now.error ? { state: 'refused', error: now.error } : { state: 'waiting' }
    },

    /** Sends one record now; the outcome is also kept on the record. */
    async sendOne<T = unknown>(key: string): Promise<SendOutcome<T>> {
      const r = this.records.find((x) => x.key === key)
      if (!r) return { state: 'waiting' }
      if (import.meta.client && !navigator.onLine) {
        this.online = false
        return { state: 'waiting' }
      }
      r.state = 'sending'
      r.attempts++
      try {
        const data = await $fetch<T>(r.url, { method: 'POST', body: r.body, headers: { 'Idempotency-Key': r.key }, timeout: SEND_TIMEOUT_MS })
        await this.forget(r.key)
        return { state: 'sent', data }
      } catch (err) {
        const e = apiErrorOf(err)
        const statusMessage = (err as { statusMessage?: string })?.statusMessage
        if (isTransient(e.statusCode, statusMessage)) {
          r.state = 'waiting'
          this.lastError = e.statusCode === 401 ? 'Sign in again to send what is waiting.' : ''
          await this.persist(r)
          return { state: 'waiting' }
        }
        r.state = 'refused'
        r.error = e
        await this.persist(r)
        return { state: 'refused', error: e }
      }
    },

    /** Sends everything waiting, oldest first; stops at the first record that cannot get through yet. */
    async flush(): Promise<{ sent: number; refused: number; waiting: number }> {
      await this.load()
      const tally = { sent: 0, refused: 0, waiting: 0 }
      // One flush at a time: a second caller waits for the running one, then sends what is still waiting.
      while (this.flushing) await new Promise((resolve) => setTimeout(resolve, 50))
      this.flushing = true
      try {
        let next: FieldRecord | undefined
        while ((next = this.records.find((r) => r.state === 'waiting'))) {
          const out = await this.sendOne(next.key)
          outcomes.set(next.key, out)
          if (out.state === 'waiting') break
          tally[out.state]++
        }
      } finally {
        this.flushing = false
      }
      tally.waiting = this.records.filter((r) => r.state === 'waiting').length
      return tally
    },

    /** Puts a refused record back in line unchanged (e.g. after the survey was returned to the person). */
    async retry(key: string) {
      const r = this.records.find((x) => x.key === key)
      if (!r) return
      r.state = 'waiting'
      r.error = null
      await this.persist(r)
      await this.flush()
    },

    /** Drops a record the person no longer wants to send. */
    async discard(key: string) {
      await this.forget(key)
    },

    setOnline(online: boolean) {
      this.online = online
    },
  },
})
