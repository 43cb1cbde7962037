import { createHash } from 'node:crypto'
import type { H3Event } from 'h3'
import { sql, type Kysely } from 'kysely'
import type { Database } from '~~/db/database'

/** Header a client sends with a write it may have to send again (offline queue, flaky network). */
export const IDEMPOTENCY_HEADER = 'idempotency-key'
const KEY_PATTERN = /^[A-Za-z0-9_-]{8,200}$/
// A claim older than this belongs to a request that died half-way (its transaction rolled back): it may be taken over.
const STALE_CLAIM_SECONDS = 120

/** JSON with object keys sorted, so the same body always hashes the same whatever the key order. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`
  if (v && typeof v === 'object') {
    return `{${Object.keys(v as Record<string, unknown>).sort()
      .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`).join(',')}}`
  }
  return JSON.stringify(v ?? null)
}

function refuse(statusCode: number, statusMessage: string, message: string): never {
  throw createError({ statusCode, statusMessage, data: { message } })
}

/**
 * Runs a write at most once per (organisation, person, Idempotency-Key). The first answer (status and body) is
 * stored; sending the same key again with the same request gets that answer back without writing again, and the
 * same key with a different request is refused with 422. A write that fails stores nothing (its transaction rolled
 * back), so the person can fix what was refused and send it again with the same key. Without the header the write
 * simply runs.
 */
export async function withIdempotency<T>(event: H3Event, ctx: MemberContext, write: () => Promise<T>): Promise<T> {
  const key = getHeader(event, IDEMPOTENCY_HEADER)?.trim()
  if (!key) return write()
  if (!KEY_PATTERN.test(key)) {
    refuse(400, 'Invalid Idempotency-Key', 'The Idempotency-Key header must be 8 to 200 letters, digits, dashes or underscores (a UUID is best).')
  }
  const route = `${event.method} ${event.path.split('?')[0]}`
  const body = await readBody(event).catch(() => undefined)
  const requestHash = createHash('sha256').update(`${route}\n${canonical(body ?? {})}`).digest('hex')
  const db = useDb()

  const claim = await db.insertInto('idempotency_keys')
    .values({ organisation_id: ctx.org.id, user_id: ctx.user.id, key, route, request_hash: requestHash, status_code: null, response: null })
    .onConflict((oc) => oc.columns(['organisation_id', 'user_id', 'key']).doNothing())
    .returning('id').executeTakeFirst()
  let claimId = claim?.id
  if (!claimId) {
    const seen = await db.selectFrom('idempotency_keys').select(['id', 'route', 'request_hash', 'status_code', 'response'])
      .select(sql<boolean>`created_at < now() - make_interval(secs => ${STALE_CLAIM_SECONDS})`.as('stale'))
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', ctx.user.id).where('key', '=', key)
      .executeTakeFirstOrThrow()
    if (seen.route !== route || seen.request_hash !== requestHash) {
      refuse(422, 'Idempotency-Key reused', 'This Idempotency-Key was already used for a different request. Each new save needs its own key; an unchanged retry reuses its key.')
    }
    if (seen.status_code !== null) {
      setResponseStatus(event, seen.status_code)
      setHeader(event, 'Idempotent-Replayed', 'true')
      return seen.response as T
    }
    if (!seen.stale) refuse(409, 'Still being saved', 'This save is still being handled. Wait a moment and send it again.')
    const taken = await db.updateTable('idempotency_keys').set({ created_at: sql`now()` } as never)
      .where('organisation_id', '=', ctx.org.id).where('id', '=', seen.id).where('status_code', 'is', null)
      .returning('id').executeTakeFirst()
    if (!taken) refuse(409, 'Still being saved', 'This save is still being handled. Wait a moment and send it again.')
    claimId = taken.id
  }

  let result: T
  try {
    result = await write()
  } catch (err) {
    // Nothing was written (the service's transaction rolled back): free the key so the fixed request can use it.
    await settle(() => db.deleteFrom('idempotency_keys').where('organisation_id', '=', ctx.org.id).where('id', '=', claimId).execute())
    throw err
  }
  // The write is committed: its answer is the request's answer even if the database went away just now; the stored
  // copy then follows as soon as it is back, so a retry with this key gets it (409 "Still being saved" until then).
  const status = getResponseStatus(event) || 200
  await settle(() => db.updateTable('idempotency_keys')
    .set({ status_code: status, response: JSON.stringify(result ?? null) })
    .where('organisation_id', '=', ctx.org.id).where('id', '=', claimId).execute())
  return result
}

/**
 * Runs a bookkeeping write on a key now, or, when the database is out of reach (a restart mid-request), again in the
 * background until it lands, for as long as the claim would otherwise block its key. Other errors are thrown.
 */
async function settle(bookkeeping: () => Promise<unknown>): Promise<void> {
  try {
    await bookkeeping()
    return
  } catch (err) {
    if (!unavailableService(err)) throw err
  }
  void (async () => {
    const until = Date.now() + STALE_CLAIM_SECONDS * 1000
    for (let wait = 200; Date.now() < until; wait = Math.min(wait * 2, 5000)) {
      await new Promise((r) => setTimeout(r, wait))
      try {
        await bookkeeping()
        console.warn('[idempotency] a key was settled once the database was back')
        return
      } catch (err) {
        if (!unavailableService(err)) break
      }
    }
    console.error('[idempotency] a key could not be settled; its claim is taken over after', STALE_CLAIM_SECONDS, 's')
  })()
}

/** How long a stored answer is kept: longer than any phone is expected to stay offline with a queued save. */
export const IDEMPOTENCY_KEEP_DAYS = 30

/**
 * Forgets answered keys older than IDEMPOTENCY_KEEP_DAYS (run by the scheduler's tick, across organisations).
 * Claims still waiting for their answer are left alone: the stale-claim takeover above deals with them.
 */
export async function pruneIdempotencyKeys(db: Kysely<Database>, now: Date = new Date()): Promise<number> {
  const r = await db.deleteFrom('idempotency_keys')
    .where('status_code', 'is not', null)
    .where('created_at', '<', sql<Date>`${now.toISOString()}::timestamptz - make_interval(days => ${IDEMPOTENCY_KEEP_DAYS})`)
    .executeTakeFirst()
  return Number(r.numDeletedRows)
}
