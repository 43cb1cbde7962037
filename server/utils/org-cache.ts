// Answers that are expensive to compute and the same for every member who may see them (the findings list, the
// dashboard's figures) are kept in this process and reused while the organisation's data has not changed.
//
// "Not changed" is exact, not a timer: organisations.change_seq goes up at the commit of every transaction that
// touches the organisation's field data (migration 20261205_0200), and requireMember reads it in the same statement
// as the membership, so a request sees every change committed before it started, whichever app instance made it.
// An answer is stored under the number read *before* it was computed, so a change committed while computing only
// makes it be computed again next time.
//
// What is not cached: anything that depends on who asks (the key must say so), and requests that send
// `Cache-Control: no-cache` (computed afresh and stored). GREYBODY_ANSWER_CACHE=off turns the cache off.
// The answer header `X-Greybody-Answer` says `reused`, `computed` or `fresh` (computed on request).
import type { H3Event } from 'h3'
import type { MemberContext } from './auth'

interface Kept {
  seq: number
  json: string
}

/** Kept answers by key, least recently used first; bounded by total size. */
const kept = new Map<string, Kept>()
let keptBytes = 0
/** Computations under way, by key and number. */
const inFlight = new Map<string, Promise<string>>()
const limitBytes = () => Number(process.env.GREYBODY_ANSWER_CACHE_MB || 64) * 1024 * 1024

function forget(key: string) {
  const k = kept.get(key)
  if (!k) return
  kept.delete(key)
  keptBytes -= k.json.length
}

function keep(key: string, value: Kept) {
  forget(key)
  if (value.json.length > limitBytes() / 4) return
  kept.set(key, value)
  keptBytes += value.json.length
  for (const oldest of kept.keys()) {
    if (keptBytes <= limitBytes()) break
    forget(oldest)
  }
}

/**
 * The JSON answer of `compute()` for this organisation and `key`, reused while organisations.change_seq is unchanged.
 * `key` names the route and every input the answer depends on besides the organisation's data (filters, page, the
 * date the figures are for). Sends the JSON itself with its content type; the handler returns what this returns.
 */
export async function reuseAnswer<T>(event: H3Event, ctx: MemberContext, key: string, compute: () => Promise<T>): Promise<string> {
  setResponseHeader(event, 'content-type', 'application/json; charset=utf-8')
  const seq = ctx.org.changeSeq
  const off = process.env.GREYBODY_ANSWER_CACHE === 'off' || seq === undefined
  const fresh = /\bno-cache\b/i.test(getRequestHeader(event, 'cache-control') ?? '')
  const fullKey = `${ctx.org.id} ${key}`
  if (!off && !fresh) {
    const hit = kept.get(fullKey)
    if (hit && hit.seq === seq) {
      // Most recently used goes last.
      kept.delete(fullKey)
      kept.set(fullKey, hit)
      setResponseHeader(event, 'x-greybody-answer', 'reused')
      return hit.json
    }
  }
  if (off || fresh) {
    const json = JSON.stringify(await compute())
    if (!off) keepUnlessNewer(fullKey, seq!, json)
    setResponseHeader(event, 'x-greybody-answer', off ? 'computed' : 'fresh')
    return json
  }
  // Requests for the same answer under the same number while it is being computed wait for that one computation
  // (after a change, every open screen asks again at once).
  const flightKey = `${fullKey} ${seq}`
  let flight = inFlight.get(flightKey)
  if (!flight) {
    flight = (async () => {
      try {
        const json = JSON.stringify(await compute())
        keepUnlessNewer(fullKey, seq!, json)
        return json
      } finally {
        inFlight.delete(flightKey)
      }
    })()
    inFlight.set(flightKey, flight)
  }
  const json = await flight
  setResponseHeader(event, 'x-greybody-answer', 'computed')
  return json
}

/** Keeps an answer, but never over one kept under a later number (from a request that started after this one's read). */
function keepUnlessNewer(fullKey: string, seq: number, json: string) {
  if ((kept.get(fullKey)?.seq ?? -1) <= seq) keep(fullKey, { seq, json })
}

/**
 * The current quarter-hour since 1970 (UTC), for keys of answers that depend on today's date in the organisation's
 * time zone: every time zone's offset is a whole number of quarter-hours, so a local date only changes when this does.
 */
export function quarterHour(now = Date.now()): number {
  return Math.floor(now / 900_000)
}
