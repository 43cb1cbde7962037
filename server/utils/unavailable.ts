import { H3Error, isError } from 'h3'

/** A backing service the app could not reach. */
export type BackingService = 'database' | 'storage'

/** Seconds a client is asked to wait before sending a refused request again. */
export const UNAVAILABLE_RETRY_AFTER_SECONDS = 5

// PostgreSQL going away or not accepting connections yet (SQLSTATE, PostgreSQL manual appendix A): class 08 connection
// exceptions, 57P01 admin_shutdown, 57P02 crash_shutdown, 57P03 cannot_connect_now, 53300 too_many_connections.
const PG_STATES = /^(08[0-9A-Z]{3}|57P0[123]|53300)$/
// Socket failures, from node-postgres (no SQLSTATE) and from the AWS SDK (which adds `$metadata`).
const SOCKET_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENETUNREACH', 'ENOTFOUND', 'EAI_AGAIN'])
// node-postgres reports a dropped or unusable connection in words only.
const PG_MESSAGES = /^(Connection terminated|Client has encountered a connection error|Client was closed and is not queryable|timeout exceeded when trying to connect)/

const MESSAGES: Record<BackingService, { status: string; message: string }> = {
  database: { status: 'Database unavailable', message: 'The database is unavailable just now. Try again in a moment.' },
  storage: { status: 'Storage unavailable', message: 'File storage is unavailable just now, so the file was not taken. Try again in a moment.' },
}

interface ErrorLike { code?: unknown; message?: unknown; name?: unknown; $metadata?: { httpStatusCode?: number }; cause?: unknown }

function classify(e: ErrorLike): BackingService | null {
  const code = typeof e.code === 'string' ? e.code : ''
  if (e.$metadata) {
    // An AWS SDK error: the store answered 5xx, timed out, or could not be reached at all.
    if (SOCKET_CODES.has(code) || e.name === 'TimeoutError' || (e.$metadata.httpStatusCode ?? 0) >= 500) return 'storage'
    return null
  }
  if (PG_STATES.test(code) || SOCKET_CODES.has(code)) return 'database'
  if (typeof e.message === 'string' && PG_MESSAGES.test(e.message)) return 'database'
  return null
}

/**
 * Which backing service an error shows to be out of reach (PostgreSQL restarting or down, object storage down), or
 * null for any other error. An h3 error is looked into (h3 wraps what a handler threw in `cause`); other wrappers are
 * not, so a failed call to some other service (e.g. `fetch failed` caused by ECONNREFUSED) is not taken for the database.
 */
export function unavailableService(error: unknown): BackingService | null {
  if (!error || typeof error !== 'object') return null
  const found = classify(error as ErrorLike)
  if (found || !isError(error)) return found
  const cause = (error as ErrorLike).cause
  return cause && typeof cause === 'object' ? classify(cause as ErrorLike) : null
}

/** The 503 answer for a service out of reach: a plain message for people, `Retry-After` for clients. */
export function serviceUnavailableError(service: BackingService): H3Error {
  const { status, message } = MESSAGES[service]
  const err = new H3Error(message)
  err.statusCode = 503
  err.statusMessage = status
  err.data = { message, service, retryAfterSeconds: UNAVAILABLE_RETRY_AFTER_SECONDS }
  return err
}

let lastDropLog = 0

/**
 * The pool's 'error' listener: an idle connection that PostgreSQL closed (restart, failover, admin shutdown) has
 * already been removed from the pool, and the next checkout opens a fresh one. Without a listener the event would
 * end the process.
 */
export function logDroppedConnection(err: Error): void {
  const now = Date.now()
  if (now - lastDropLog < 1000) return
  lastDropLog = now
  console.warn(`[unavailable] database: an idle connection was dropped (${(err as { code?: string }).code ?? ''} ${err.message})`)
}
