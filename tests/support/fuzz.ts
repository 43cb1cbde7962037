import { readdirSync, readFileSync, statSync } from 'node:fs'
import path from 'node:path'
import { destr } from 'destr'
import pg from 'pg'
import { inject } from 'vitest'
import { z } from 'zod'
import { ROOT } from './env'

// Generated request bodies for the bad-input test (tests/e2e/input-fuzz.test.ts): a seeded generator, so a failure
// is made again from its seed; a copy of how the server reads a body, so each body is known valid or invalid before
// it is sent; and a digest of the database, so a refused request is seen to have written nothing.

/** Seed of every generated body: FUZZ_SEED=<n> repeats a run exactly (each route mixes in its own file name). */
export const FUZZ_SEED = Number(process.env.FUZZ_SEED || 20261204)
/** Generated bodies per write route; FUZZ_BODIES=<n> for a deeper run. */
export const FUZZ_BODIES = Number(process.env.FUZZ_BODIES || 200)

/** mulberry32: a small, fast, seeded PRNG (public domain), plenty for choosing test inputs. */
export function prng(seed: number) {
  let a = seed >>> 0
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return {
    next,
    int: (n: number) => Math.floor(next() * n),
    pick: <T>(xs: readonly T[]): T => xs[Math.floor(next() * xs.length)]!,
  }
}
export type Rng = ReturnType<typeof prng>

/** A 32-bit FNV-1a hash, to give each route its own stream from one seed. */
export function hash32(s: string): number {
  let h = 0x811c9dc5
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193)
  return h >>> 0
}

// ---- Which routes write ---------------------------------------------------------------------------------------

export interface WriteRouteFile {
  /** Path under server/api, e.g. `orgs/[org]/sites/index.post.ts`. */
  file: string
  /** POST, PUT, PATCH, DELETE; ANY for a catch-all handler without a method in its name (next-auth). */
  method: string
}

/** Every file under server/api that answers a method other than GET, read from the folder so none is forgotten. */
export function writeRouteFiles(): WriteRouteFile[] {
  const base = path.join(ROOT, 'server/api')
  const out: WriteRouteFile[] = []
  const walk = (dir: string) => {
    for (const f of readdirSync(dir)) {
      const p = path.join(dir, f)
      if (statSync(p).isDirectory()) { walk(p); continue }
      const file = path.relative(base, p).split(path.sep).join('/')
      const m = /\.(get|head|post|put|patch|delete)\.ts$/.exec(f)
      if (m) { if (m[1] !== 'get' && m[1] !== 'head') out.push({ file, method: m[1]!.toUpperCase() }); continue }
      if (f.endsWith('.ts')) out.push({ file, method: 'ANY' })
    }
  }
  walk(base)
  return out.sort((a, b) => a.file.localeCompare(b.file))
}

/**
 * The zod schemas a route hands to `bodyOf`, found in its source and imported from shared/ (a route validating its
 * body with a new schema is fuzzed against it without a change here). Empty when the route reads no body this way.
 */
export async function bodySchemasOf(file: string): Promise<z.ZodType[]> {
  const source = readFileSync(path.join(ROOT, 'server/api', file), 'utf8')
  const names = [...source.matchAll(/bodyOf\(event,\s*([A-Za-z0-9_]+)\)/g)].map((m) => m[1]!)
  const schemas: z.ZodType[] = []
  for (const name of names) {
    const imp = [...source.matchAll(/import\s*\{([^}]*)\}\s*from\s*'([^']+)'/g)]
      .find((m) => m[1]!.split(',').map((s) => s.trim()).includes(name))
    if (!imp) throw new Error(`${file}: the body schema ${name} is not imported from shared/; give the route its schema in the fuzz table`)
    const spec = imp[2]!.replace(/^#shared\//, `${ROOT}shared/`).replace(/^~~\//, ROOT)
    const mod = await import(/* @vite-ignore */ `${spec}.ts`)
    schemas.push(mod[name])
  }
  return schemas
}

// ---- How the server reads a body ------------------------------------------------------------------------------

export type ServerView = { parsed: true; value: unknown } | { parsed: false }

/**
 * What `bodyOf` (server/utils/validation.ts) sees for these bytes, the way h3's readBody parses them: strict JSON
 * (destr, which refuses `__proto__`/`constructor` keys) for `application/json`, a form for urlencoded, the text for
 * `text/*`, lenient JSON otherwise. `parsed: false` = the body cannot be read (bodyOf answers 400).
 */
export function serverView(payload: Uint8Array | undefined, contentType: string | undefined): ServerView {
  const text = payload && payload.length ? Buffer.from(payload).toString('utf8') : ''
  if (!text) return { parsed: true, value: {} }
  const ct = contentType ?? ''
  let value: unknown
  if (ct === 'application/json') {
    try { value = destr(text, { strict: true }) } catch { return { parsed: false } }
  } else if (ct.startsWith('application/x-www-form-urlencoded')) {
    const form: Record<string, unknown> = Object.create(null)
    for (const [k, v] of new URLSearchParams(text)) form[k] = k in form ? [form[k], v].flat() : v
    value = form
  } else if (ct.startsWith('text/')) {
    value = text
  } else {
    value = destr(text, { strict: false })
  }
  return { parsed: true, value: value ?? {} }
}

const holdsNul = (v: unknown): boolean =>
  typeof v === 'string' ? v.includes('\u0000') : !!v && typeof v === 'object' && Object.values(v).some(holdsNul)

/**
 * Whether the route takes what the server will see: every schema it validates with accepts it, and no text in the
 * result holds a NUL character (bodyOf refuses those: PostgreSQL cannot store them).
 */
export function schemaAccepts(schemas: z.ZodType[], view: ServerView): boolean {
  if (!view.parsed) return false
  return schemas.every((s) => {
    const r = s.safeParse(view.value)
    return r.success && !holdsNul(r.data)
  })
}

// ---- Generated bodies -----------------------------------------------------------------------------------------

export interface FuzzBody {
  /** What was done to the valid example, for the failure message. */
  label: string
  payload?: Uint8Array
  contentType?: string
}

const RAW = '\u0001raw\u0001'
/** A number literal written into the JSON text as is (1e400, 30-digit integers), which JSON.stringify cannot. */
export const rawNumber = (literal: string) => `${RAW}${literal}${RAW}`
const encoder = new TextEncoder()

/** JSON text of a value, with raw number literals put in place. */
export function serialise(value: unknown): string {
  return JSON.stringify(value).replace(/"\\u0001raw\\u0001(.*?)\\u0001raw\\u0001"/g, '$1')
}

const json = (label: string, value: unknown): FuzzBody => ({ label, payload: encoder.encode(serialise(value)), contentType: 'application/json' })
const text = (label: string, body: string | Uint8Array | undefined, contentType?: string): FuzzBody =>
  ({ label, payload: typeof body === 'string' ? encoder.encode(body) : body, contentType })

/** Sets a key as an own property, also `__proto__` (plain assignment would change the prototype instead). */
function withKey(obj: Record<string, unknown>, key: string, value: unknown): Record<string, unknown> {
  const out = { ...obj }
  Object.defineProperty(out, key, { value, enumerable: true, writable: true, configurable: true })
  return out
}

const MB = 1024 * 1024
/** Strings that break naive code: direction overrides, emoji, NUL, lone surrogates, injections, path tricks. */
export const NASTY_STRINGS = [
  '', ' ', '\t\n', 'é', 'שלום עולם', 'مرحبا بالعالم', '\u202Egnp.exe', '🔥🧯⚡', '👩‍🔧👨🏿‍🏭', 'e\u0301\u0301\u0301', '\u0000', 'a\u0000b',
  '\ud800', 'x\udfffy', '\u200b\u200d', '\ufeffBOM', '\u0085\u2028\u2029', "' or 1=1 --", '"; drop table sites; --', '%00%0a',
  '../../etc/passwd', 'C:\\Windows\\win.ini', '<script>alert(1)</script>', '{{7*7}}${7*7}', 'null', 'NaN', 'Infinity', '-1',
  '1e309', '0x10', 'true', '0000-01-01', '9999-12-31', '2026-02-30', '+275760-09-13', '00000000-0000-0000-0000-000000000000',
  'A'.repeat(10_000), '🔥'.repeat(3_000),
]
/** Numbers at the edges: signs, fractions, 32- and 53-bit limits, overflow to infinity (raw literals), denormals. */
export const NASTY_NUMBERS: unknown[] = [
  0, -0, -1, 1, 0.5, -0.5, 1.5, 2147483647, 2147483648, -2147483649, 9007199254740991, 1e21, -1e21, 1e308, -1e308, 5e-324,
  rawNumber('1e400'), rawNumber('-1e400'), rawNumber('123456789012345678901234567890'), rawNumber('1E+2'), rawNumber('-0.0e-0'),
]
const OTHER_VALUES: unknown[] = [true, false, null, [], [null], {}, { a: 1 }, [[[[]]]]]
const PROTO_KEYS = ['__proto__', 'constructor', 'prototype']
/** Keys a client might hope the server copies blindly into a row. */
const SMUGGLED_KEYS = ['id', 'organisationId', 'organisation_id', 'userId', 'createdBy', 'role', 'state', 'archivedAt', 'isAdmin', 'version', 'passwordHash']

interface JsonSchemaProp {
  type?: string | string[]
  enum?: unknown[]
  format?: string
  minimum?: number
  maximum?: number
  exclusiveMinimum?: number
  exclusiveMaximum?: number
  minLength?: number
  maxLength?: number
  maxItems?: number
  items?: JsonSchemaProp
  properties?: Record<string, JsonSchemaProp>
  anyOf?: JsonSchemaProp[]
}

/** Field descriptions from the route's zod schemas (their JSON Schema), merged when a route uses two. */
export function fieldsOf(schemas: z.ZodType[]): Record<string, JsonSchemaProp> {
  const out: Record<string, JsonSchemaProp> = {}
  for (const s of schemas) {
    try {
      const js = z.toJSONSchema(s, { io: 'input', unrepresentable: 'any' }) as JsonSchemaProp
      Object.assign(out, js.properties ?? {})
    } catch { /* a schema JSON Schema cannot describe: the generic values still apply */ }
  }
  return out
}

/** The concrete shapes a field may take (a nullable field is an anyOf of its type and null). */
function variants(p: JsonSchemaProp | undefined): JsonSchemaProp[] {
  if (!p) return []
  return p.anyOf ? p.anyOf.flatMap(variants) : [p]
}

/** Values aimed at one field's rules: just past each bound, near-miss enum values, malformed ids and dates. */
function aimedValues(p: JsonSchemaProp | undefined, example: unknown, otherTenantIds: string[], rnd: Rng): unknown[] {
  const out: unknown[] = []
  for (const v of variants(p)) {
    if (v.type === 'number' || v.type === 'integer') {
      const lo = v.minimum ?? v.exclusiveMinimum
      const hi = v.maximum ?? v.exclusiveMaximum
      if (lo !== undefined) out.push(lo, lo - 1, lo - 1e-9, String(lo))
      if (hi !== undefined) out.push(hi, hi + 1, hi + 1e-9, hi * 10)
      if (v.type === 'integer') out.push(1.5, (lo ?? 0) + 0.5)
    }
    if (v.type === 'string') {
      // Limits past 100 000 characters (CSV text) are left to the fixed 1 MB bodies: 20 MB bodies would only be slow.
      if (v.maxLength !== undefined && v.maxLength <= 100_000) out.push('x'.repeat(v.maxLength), 'x'.repeat(v.maxLength + 1), '🔥'.repeat(v.maxLength), ' '.repeat(v.maxLength + 1))
      if (v.minLength !== undefined && v.minLength > 0) out.push('x'.repeat(v.minLength - 1), ' '.repeat(v.minLength + 2))
      if (v.format === 'uuid') {
        out.push(...otherTenantIds, '00000000-0000-0000-0000-000000000000', 'ffffffff-ffff-ffff-ffff-ffffffffffff', crypto.randomUUID(),
          typeof example === 'string' ? example.toUpperCase() : '', typeof example === 'string' ? example.replace(/-/g, '') : '',
          typeof example === 'string' ? `${example} ` : '', typeof example === 'string' ? `${example}\u0000` : '')
      }
      if (v.format === 'date') out.push('0000-01-01', '0001-01-01', '9999-12-31', '2026-02-29', '2026-13-01', '2026-1-1', '1899-12-31', '20261202', '2026-12-02T00:00:00Z')
      if (v.format === 'email') out.push('a@b', 'a@b.c'.padStart(300, 'x'), 'first.last@exa mple.org', 'émile@exämple.org', 'a@b.c\u0000', 'A@B.ORG')
    }
    if (v.enum) {
      for (const e of v.enum) if (typeof e === 'string') out.push(e.toUpperCase(), ` ${e}`, `${e}\u0000`, `${e}\u200b`)
      out.push('')
    }
    if (v.type === 'array') {
      const first = Array.isArray(example) ? example[0] : undefined
      out.push([], [null], [first, first], Array.from({ length: (v.maxItems ?? 50) + 1 }, () => first ?? 'x'), [{}], [[first]])
      if (first !== undefined) for (const inner of aimedValues(v.items, first, otherTenantIds, rnd).slice(0, 6)) out.push([inner])
    }
    if (v.type === 'object' && v.properties) {
      const keys = Object.keys(v.properties)
      const base = (example && typeof example === 'object' && !Array.isArray(example) ? example : {}) as Record<string, unknown>
      for (const k of keys) out.push({ ...base, [k]: rnd.pick([null, 'x', -1, 1.5, [], {}, 1e21]) })
      out.push(withKey(base, '__proto__', { polluted: 'fuzz' }))
    }
  }
  return out
}

/** A value of the wrong type, or at an edge, or just nasty, for one field. */
function mutantFor(p: JsonSchemaProp | undefined, example: unknown, otherTenantIds: string[], rnd: Rng): unknown {
  const aimed = aimedValues(p, example, otherTenantIds, rnd)
  const roll = rnd.next()
  if (aimed.length && roll < 0.45) return rnd.pick(aimed)
  if (roll < 0.7) return rnd.pick(NASTY_STRINGS)
  if (roll < 0.9) return rnd.pick(NASTY_NUMBERS)
  return rnd.pick([...OTHER_VALUES, [example], { value: example }, String(example)])
}

/**
 * A few hundred bodies built from one valid example: every field in turn replaced by a wrong type, an edge value or a
 * nasty string; fields left out; smuggled and prototype-pollution keys; other JSON values where an object is expected;
 * 1 MB strings; invalid JSON; other content types. The fixed cases come first, then seeded random ones.
 */
export function generateBodies(example: Record<string, unknown>, schemas: z.ZodType[], count: number, rnd: Rng, otherTenantIds: string[]): FuzzBody[] {
  const props = fieldsOf(schemas)
  const fields = [...new Set([...Object.keys(example), ...Object.keys(props)])]
  const exampleJson = serialise(example)
  const fixed: FuzzBody[] = [
    text('no body', undefined),
    text('empty JSON body', '', 'application/json'),
    text('whitespace only', ' \n\t ', 'application/json'),
    text('truncated JSON', exampleJson.slice(0, Math.max(1, exampleJson.length - 3)), 'application/json'),
    text('JSON with a trailing comma', exampleJson.replace(/\}$/, ',}'), 'application/json'),
    text('single-quoted keys', "{'a': 1}", 'application/json'),
    text('garbage after the JSON', `${exampleJson}garbage`, 'application/json'),
    text('NaN literal', 'NaN', 'application/json'),
    text('NUL byte', '\u0000', 'application/json'),
    text('invalid UTF-8 bytes', new Uint8Array([0x7b, 0x22, 0xff, 0xfe, 0x22, 0x3a, 0x31, 0x7d]), 'application/json'),
    text('byte order mark before the JSON', `\ufeff${exampleJson}`, 'application/json'),
    text('UTF-16 encoded JSON', Buffer.from(exampleJson, 'utf16le'), 'application/json'),
    text('1 MB of unclosed brackets', '['.repeat(MB), 'application/json'),
    text('nested 10 000 deep', `${'['.repeat(10_000)}${']'.repeat(10_000)}`, 'application/json'),
    text('duplicate keys', exampleJson.replace(/^\{/, '{"x":1,"x":2,'), 'application/json'),
    json('array instead of an object', []),
    json('the example inside an array', [example]),
    json('a string instead of an object', 'example'),
    json('a number instead of an object', 42),
    json('true instead of an object', true),
    json('null instead of an object', null),
    text('infinite number instead of an object', '1e400', 'application/json'),
    text('the example as text/plain', exampleJson, 'text/plain'),
    text('the example as a form content type', exampleJson, 'application/x-www-form-urlencoded'),
    text('the example form-encoded', new URLSearchParams(Object.entries(example).map(([k, v]) => [k, typeof v === 'string' ? v : JSON.stringify(v)])).toString(), 'application/x-www-form-urlencoded'),
    text('the example as multipart', `--b\r\nContent-Disposition: form-data; name="x"\r\n\r\n${exampleJson}\r\n--b--\r\n`, 'multipart/form-data; boundary=b'),
    text('the example as XML', `<?xml version="1.0"?><body>${exampleJson}</body>`, 'application/xml'),
    text('the example without a content type', exampleJson, undefined),
    text('the example with charset utf-16', exampleJson, 'application/json; charset=utf-16'),
    json('every field null', Object.fromEntries(fields.map((f) => [f, null]))),
    json('every field a string', Object.fromEntries(fields.map((f) => [f, String(example[f] ?? '')]))),
    json('every field an array', Object.fromEntries(fields.map((f) => [f, [example[f] ?? 1]]))),
    json('every field an object', Object.fromEntries(fields.map((f) => [f, { value: example[f] ?? 1 }]))),
    json('a 1 MB extra field', { ...example, notes2: 'x'.repeat(MB) }),
    json('a 1 MB key', withKey(example, 'k'.repeat(MB), 1)),
    ...PROTO_KEYS.map((k) => json(`extra key ${k}`, withKey(example, k, { polluted: 'fuzz', prototype: { polluted: 'fuzz' } }))),
    json('__proto__ nested in every object field', Object.fromEntries(Object.entries(example).map(([k, v]) =>
      [k, v && typeof v === 'object' && !Array.isArray(v) ? withKey(v as Record<string, unknown>, '__proto__', { polluted: 'fuzz' }) : v]))),
    json('smuggled keys', { ...Object.fromEntries(SMUGGLED_KEYS.map((k) => [k, k === 'version' ? 1 : otherTenantIds[0] ?? 'x'])), ...example }),
    json('smuggled keys overriding', { ...example, ...Object.fromEntries(SMUGGLED_KEYS.filter((k) => !(k in example)).map((k) => [k, otherTenantIds[0] ?? 'owner'])) }),
  ]
  // The 1 MB strings: one in the first string field, one of multi-byte characters in the next.
  const stringFields = fields.filter((f) => typeof example[f] === 'string')
  if (stringFields[0]) fixed.push(json(`${stringFields[0]} ← 1 MB string`, { ...example, [stringFields[0]]: 'x'.repeat(MB) }))
  const multiByteField = stringFields[1] ?? stringFields[0]
  if (multiByteField) fixed.push(json(`${multiByteField} ← 1 MB of emoji`, { ...example, [multiByteField]: '🔥'.repeat(MB / 4) }))
  for (const f of fields) fixed.push(json(`without ${f}`, Object.fromEntries(Object.entries(example).filter(([k]) => k !== f))))

  const out = fixed.slice(0, Math.max(count, fields.length))
  // Distinct bodies only: a route with one field (a version) has fewer than `count` of them.
  const seen = new Set(out.map((b) => `${b.contentType} ${b.payload ? Buffer.from(b.payload).toString('base64') : ''}`))
  const push = (b: FuzzBody) => {
    const key = `${b.contentType} ${Buffer.from(b.payload!).toString('base64')}`
    if (!seen.has(key)) { seen.add(key); out.push(b) }
  }
  for (let attempts = 0; out.length < count && attempts < count * 4; attempts++) {
    const roll = rnd.next()
    if (!fields.length || roll < 0.06) {
      // Random keys and values, no relation to the route.
      const junk: Record<string, unknown> = {}
      for (let i = rnd.int(6); i >= 0; i--) junk[rnd.pick([...NASTY_STRINGS.slice(0, 20), ...fields, ...PROTO_KEYS])] = mutantFor(undefined, undefined, otherTenantIds, rnd)
      push(json('random keys and values', junk))
    } else if (roll < 0.7) {
      const f = rnd.pick(fields)
      const v = mutantFor(props[f], example[f], otherTenantIds, rnd)
      push(json(`${f} ← ${describe(v)}`, withKey(example, f, v)))
    } else if (roll < 0.88) {
      let body = example
      const changed = new Map<string, string>()
      for (let i = 2 + rnd.int(2); i > 0; i--) {
        const f = rnd.pick(fields)
        const v = mutantFor(props[f], example[f], otherTenantIds, rnd)
        body = withKey(body, f, v)
        changed.set(f, `${f} ← ${describe(v)}`)
      }
      push(json([...changed.values()].join(', '), body))
    } else if (stringFields.length) {
      // The example with a text field in another script or with emoji, often still valid: the server may accept it.
      const f = rnd.pick(stringFields)
      const v = rnd.pick(['Überprüfung Ω', 'اختبار', 'テスト', '🔥 hot joint', 'ok\u202e', 'x\u200by', 'naïve café'])
      push(json(`${f} ← ${describe(v)}`, withKey(example, f, v)))
    } else {
      const f = rnd.pick(fields)
      push(json(`without ${f}, with ${f}_`, withKey(Object.fromEntries(Object.entries(example).filter(([k]) => k !== f)), `${f}_`, example[f])))
    }
  }
  return out
}

/** A short description of a value for failure messages (long strings by length). */
export function describe(v: unknown): string {
  if (typeof v === 'string' && v.startsWith(RAW)) return v.slice(RAW.length, -RAW.length)
  if (typeof v === 'string') return v.length > 40 ? `string(${v.length}) ${JSON.stringify(v.slice(0, 20))}…` : JSON.stringify(v)
  const s = serialise(v)
  return s === undefined ? String(v) : s.length > 60 ? `${s.slice(0, 60)}… (${s.length} chars)` : s
}

// ---- Nothing half-written -------------------------------------------------------------------------------------

/**
 * Tables a refused request writes to by design: failed sign-ins (counted for the rate limit and the account's
 * history) and API token request logs. Everything else must be exactly as it was after a refused request.
 */
export const ATTEMPT_LOG_TABLES = ['sign_in_failures', 'account_events', 'api_token_requests', 'api_token_windows', 'job_runs']

let digestClient: Promise<{ client: pg.Client; text: string }> | undefined

/**
 * Per table (but the attempt logs): its row count and the newest transaction id among its rows. A committed insert
 * or update gives a row a new `xmin`, a delete lowers the count, and a rolled-back write leaves neither, so any
 * committed write shows, at a fraction of the cost of hashing every row. One system connection (past the tenant
 * wall) with the query prepared once: it runs after every generated body the route may accept.
 */
export async function databaseDigest(except: string[] = []): Promise<Map<string, string>> {
  digestClient ??= (async () => {
    const client = new pg.Client({ connectionString: inject('databaseUrl'), options: '-c greybody.org=*' })
    await client.connect()
    const { rows } = await client.query<{ tablename: string }>(
      "select tablename from pg_tables where schemaname = 'public' and tablename not like 'kysely_%' order by tablename")
    const text = rows.filter((t) => !ATTEMPT_LOG_TABLES.includes(t.tablename)).map((t) =>
      `select '${t.tablename}' as t, count(*)::int as n, coalesce(max(x.xmin::text::bigint), 0)::text as h from "${t.tablename}" x`).join(' union all ')
    return { client, text }
  })()
  const { client, text } = await digestClient
  const { rows } = await client.query<{ t: string; n: number; h: string }>({ name: 'fuzz-digest', text })
  return new Map(rows.filter((r) => !except.includes(r.t)).map((r) => [r.t, `${r.n} rows, newest xmin ${r.h}`]))
}

/** Closes the digest's connection (end of the test file). */
export async function closeDigest(): Promise<void> {
  if (digestClient) await (await digestClient).client.end()
  digestClient = undefined
}

/** The tables whose digest differs. */
export function changedTables(before: Map<string, string>, after: Map<string, string>): string[] {
  return [...new Set([...before.keys(), ...after.keys()])].filter((t) => before.get(t) !== after.get(t))
}

/** Runs tasks with at most `limit` in flight, keeping their order in the results. */
export async function inPool<T, R>(items: T[], limit: number, task: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const results: R[] = new Array(items.length)
  let next = 0
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (next < items.length) {
      const i = next++
      results[i] = await task(items[i]!, i)
    }
  }))
  return results
}
