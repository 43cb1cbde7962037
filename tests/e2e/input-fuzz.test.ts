import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, type ApiResponse } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import {
  FUZZ_BODIES, FUZZ_SEED, NASTY_STRINGS, bodySchemasOf, changedTables, closeDigest, databaseDigest, describe as describeValue, generateBodies, hash32,
  inPool, prng, schemaAccepts, serialise, serverView, writeRouteFiles, type FuzzBody,
} from '../support/fuzz'
import { CURRENT_VERSION, FUZZ_ROUTES, NOT_FUZZED, fuzzFixture, pathOf, type FuzzFixture, type FuzzRoute } from '../support/fuzz-routes'
import { jpegBytes, objectExists, pngBytes, uploadImage } from '../support/images'

// Bad input on every write route: a few hundred bodies per route generated from one valid body (FUZZ_BODIES, seeded
// by FUZZ_SEED; FUZZ_ONLY=<part of a file name> runs some routes). Every answer is below 500, carries no stack trace,
// and a 4xx carries data.message — a 400 also data.fieldErrors. A body the route's own zod schema refuses must be
// refused with 400, and every refused request leaves the database exactly as it was (digest of every table).

const ONLY = process.env.FUZZ_ONLY
const STACK = /\n\s+at\s|\bat [\w$.<>]+ \([^)]*:\d+:\d+\)|node_modules\/|\.(?:mjs|ts):\d+:\d+/
/** Junk bodies sent to each malformed or foreign id of a route that reads no body. */
const NO_BODY_COUNT = Math.min(FUZZ_BODIES, 40)

let f: FuzzFixture
const started = Date.now()
const figures: Array<{ file: string; requests: number; accepted: number; statuses: Record<number, number>; ms: number }> = []

beforeAll(async () => {
  await resetDatabase()
  f = await fuzzFixture()
}, 180_000)

afterAll(async () => {
  await closeDigest()
  const requests = figures.reduce((n, r) => n + r.requests, 0)
  const accepted = figures.reduce((n, r) => n + r.accepted, 0)
  console.log(`input fuzz (FUZZ_SEED=${FUZZ_SEED}, FUZZ_BODIES=${FUZZ_BODIES}): ${figures.length} routes, ${requests} requests, ` +
    `${accepted} accepted as valid, ${((Date.now() - started) / 1000).toFixed(1)} s in all`)
  for (const r of figures) console.log(`  ${r.file}: ${r.requests} requests, ${r.accepted} accepted, ${JSON.stringify(r.statuses)}, ${r.ms} ms`)
})

interface Expectation {
  /** Why the request must be refused (undefined: it may be accepted). */
  refuse?: string
  /** The route's schema refuses the body: exactly 400 with field errors. */
  schemaRefuses?: boolean
}

/** What is wrong with one answer, if anything. */
function problemsOf(res: ApiResponse & { text: string }, exp: Expectation, route: FuzzRoute): string[] {
  const out: string[] = []
  if (res.status >= 500) out.push(`server error ${res.status}`)
  if (STACK.test(res.text)) out.push('a stack trace in the answer')
  if (/polluted/.test(res.text)) out.push('a prototype-pollution payload came back')
  if (res.status >= 400 && res.status < 500) {
    const data = res.body?.data
    // 413 comes from the request size limit (nuxt-security) before any route runs: its status text is the message.
    const message = res.status === 413 ? res.body?.message : data?.message
    if (typeof message !== 'string' || !message.trim()) out.push(`${res.status} without data.message`)
    if (res.status === 400 && !route.ownProtocol && !(data?.fieldErrors && Object.keys(data.fieldErrors).length)) out.push('400 without data.fieldErrors')
  }
  if (exp.refuse && res.status < 400) out.push(`accepted (${res.status}) although ${exp.refuse}`)
  else if (exp.schemaRefuses && res.status !== 400) out.push(`${res.status} instead of 400 for a body the schema refuses`)
  return out
}

/** Puts bytes in place of a placeholder (the row's current version) in a payload. */
function withVersion(payload: Uint8Array | undefined, version: number): Uint8Array | undefined {
  if (!payload) return payload
  const buf = Buffer.from(payload)
  const at = buf.indexOf(CURRENT_VERSION)
  return at < 0 ? payload : Buffer.concat([buf.subarray(0, at), Buffer.from(String(version)), buf.subarray(at + CURRENT_VERSION.length)])
}

/** Ids that name nothing of this organisation: malformed, unknown, another organisation's, or path tricks. */
function badIds(): string[] {
  return ['not-a-uuid', '00000000-0000-0000-0000-000000000000', crypto.randomUUID(), ...f.otherTenantIds.slice(0, 2), `${f.ids.site}%00`,
    '..%2F..%2Fetc%2Fpasswd', encodeURIComponent('🔥'), 'x'.repeat(3000), '%E2%80%AE1', '1;drop table sites']
}

/** The route's path with its last id (or token) replaced by each bad id. */
function pathsWithBadIds(path: string): string[] {
  const [bare, query] = path.split('?')
  const segments = bare!.split('/')
  const at = segments.findLastIndex((s) => /^[0-9a-f]{8}-[0-9a-f-]{27}$/i.test(s) || /^[a-z]{40,}$/.test(s))
  if (at < 0) return []
  return badIds().map((id) => [...segments.slice(0, at), id, ...segments.slice(at + 1)].join('/') + (query ? `?${query}` : ''))
}

/** GETs that must still answer after a route's fuzz (an accepted value must not break what reads it). */
async function readsStillWork(quick = false): Promise<string[]> {
  const api = (p: string) => `/api/orgs/${f.slug}${p}`
  const reads: Array<[ApiClient, string]> = quick
    ? [[f.owner, api('/dashboard')], [f.person, '/api/account/me']]
    : [
        [f.owner, api('')], [f.owner, api('/dashboard')], [f.owner, api('/sites')], [f.owner, api('/assets')], [f.owner, api('/findings')],
        [f.owner, api(`/surveys/${f.ids.survey}`)], [f.owner, api(`/work-orders/${f.ids.workOrder}`)], [f.owner, api('/work-orders')],
        [f.owner, api('/programme/summary')], [f.owner, api('/routes')], [f.owner, api(`/grids/${f.ids.grid}`)], [f.person, '/api/account/me'],
      ]
  const out: string[] = []
  for (const [client, path] of reads) {
    const res = await client.get(path)
    if (res.status >= 500 || res.status === 401) out.push(`GET ${path} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`)
  }
  return out
}

function excerpt(body: FuzzBody): string {
  const text = body.payload ? Buffer.from(body.payload).toString('utf8') : '(none)'
  return text.length > 300 ? `${text.slice(0, 300)}… (${body.payload!.length} bytes)` : text
}

async function fuzz(file: string, method: string) {
  const route = FUZZ_ROUTES[file]!
  const t0 = Date.now()
  const client = route.as?.(f) ?? f.owner
  const path = route.path?.(f) ?? pathOf(file, f)
  const schemas = await bodySchemasOf(file)
  const rnd = prng(FUZZ_SEED ^ hash32(file))
  const example = route.body?.(f) ?? {}
  const versionRow = route.versionOf?.(f)
  const currentVersion = async () => versionRow
    ? Number((await testDb().selectFrom(versionRow.table).select('version').where('id', '=', versionRow.id).executeTakeFirstOrThrow()).version)
    : 1
  const viewOf = (b: FuzzBody) => serverView(withVersion(b.payload, 1), b.contentType)
  // The valid example must be valid, or every "almost valid" body would be refused for the example's fault.
  if (!route.noBody && schemas.length) {
    const exampleBody: FuzzBody = { label: 'the example', payload: new TextEncoder().encode(serialise(example)), contentType: 'application/json' }
    expect(schemaAccepts(schemas, viewOf(exampleBody)), `${file}: the example body is not valid for the route's schema`).toBe(true)
  }

  // The example itself must get past validation (or every generated body would be refused for the example's fault):
  // accepted, or refused for the state of the row only.
  if (!route.noBody) {
    const res = await client.raw(method, path, withVersion(new TextEncoder().encode(serialise(example)), await currentVersion()), { 'content-type': 'application/json', ...route.headers })
    const allowed = route.bogusCredential || route.exampleRefused ? res.status >= 400 && res.status < 500 : res.status < 300 || res.status === 409
    expect(allowed, `${file}: the example answered ${res.status} ${res.text.slice(0, 300)}`).toBe(true)
  }

  // Requests: generated bodies on the real path; the example (or junk) on malformed and foreign ids.
  const requests: Array<{ path: string; body: FuzzBody; exp: Expectation }> = []
  const badPaths = pathsWithBadIds(path)
  if (route.noBody) {
    const junk = generateBodies(example, [], NO_BODY_COUNT, rnd, f.otherTenantIds)
    if (badPaths.length) {
      for (const [i, body] of junk.entries()) requests.push({ path: badPaths[i % badPaths.length]!, body, exp: { refuse: 'the id names nothing of this organisation' } })
    } else {
      // No id in the path (billing portal, cancel): the body is ignored, so it may be accepted; never a 5xx.
      for (const body of junk.slice(0, 20)) requests.push({ path, body, exp: route.bogusCredential ? { refuse: 'the credential is made up' } : {} })
    }
  } else {
    for (const body of generateBodies(example, schemas, FUZZ_BODIES, rnd, f.otherTenantIds)) {
      const schemaRefuses = schemas.length > 0 && !schemaAccepts(schemas, viewOf(body))
      const exp: Expectation = route.bogusCredential ? { refuse: 'the credential is made up', schemaRefuses } : schemaRefuses ? { refuse: 'the route\'s schema refuses the body', schemaRefuses } : {}
      requests.push({ path, body, exp })
    }
    for (const bad of badPaths.slice(0, 8)) {
      requests.push({ path: bad, body: { label: 'the example, on a bad id', payload: new TextEncoder().encode(serialise(example)), contentType: 'application/json' }, exp: { refuse: 'the id names nothing of this organisation' } })
    }
  }

  const failures: string[] = []
  const statuses: Record<number, number> = {}
  let accepted = 0
  const send = async (r: (typeof requests)[number], index: number) => {
    const headers: Record<string, string> = { ...route.headers }
    if (r.body.contentType !== undefined) headers['content-type'] = r.body.contentType
    const res = await client.raw(method, r.path, withVersion(r.body.payload, await currentVersion()), headers)
    statuses[res.status] = (statuses[res.status] ?? 0) + 1
    if (res.status < 400) accepted++
    const problems = problemsOf(res, r.exp, route)
    if (problems.length) {
      failures.push(`#${index} ${r.body.label} → ${method} ${r.path.slice(0, 160)} (${r.body.contentType ?? 'no content type'})\n` +
        `    body: ${excerpt(r.body)}\n    answer ${res.status}: ${res.text.slice(0, 400)}\n    problems: ${problems.join('; ')}`)
    }
    return res
  }

  // Bodies that must be refused go first, four at a time; then the whole database must be as it was.
  const mustRefuse = requests.map((r, i) => [r, i] as const).filter(([r]) => r.exp.refuse)
  const mayAccept = requests.map((r, i) => [r, i] as const).filter(([r]) => !r.exp.refuse)
  let before = await databaseDigest()
  await inPool(mustRefuse, 4, ([r, i]) => send(r, i))
  let after = await databaseDigest()
  const changed = changedTables(before, after)
  if (changed.length) failures.push(`refused requests changed tables: ${changed.join(', ')}`)

  // Bodies the schema accepts, one at a time: each refused one must leave every table as it was, each accepted one is
  // a valid body (the schema said so) and may write.
  before = after
  for (const [r, i] of mayAccept) {
    const res = await send(r, i)
    after = await databaseDigest()
    if (res.status >= 400) {
      const tables = changedTables(before, after)
      if (tables.length) failures.push(`#${i} ${r.body.label}: refused with ${res.status} but changed ${tables.join(', ')}`)
    } else if (route.settings) {
      // An accepted edit must leave the organisation readable (a setting the server cannot use would break its pages).
      for (const broken of await readsStillWork(true)) failures.push(`#${i} ${r.body.label}: accepted, and then ${broken}`)
    }
    before = after
  }

  failures.push(...await readsStillWork())
  figures.push({ file, requests: requests.length, accepted, statuses, ms: Date.now() - t0 })
  expect(failures, `FUZZ_SEED=${FUZZ_SEED} FUZZ_BODIES=${FUZZ_BODIES} FUZZ_ONLY=${file}\n${failures.slice(0, 12).join('\n')}`).toEqual([])
}

describe('every write route', () => {
  const files = writeRouteFiles()

  it('is fuzzed here, or left out with a written reason', () => {
    const listed = new Set([...Object.keys(FUZZ_ROUTES), ...Object.keys(NOT_FUZZED)])
    expect(files.map((r) => r.file).filter((file) => !listed.has(file)), 'add these to tests/support/fuzz-routes.ts').toEqual([])
    expect([...listed].filter((file) => !files.some((r) => r.file === file)), 'these no longer exist').toEqual([])
  })

  // Routes whose every request performs an action (no id to get wrong) run last.
  const order = (file: string) => (FUZZ_ROUTES[file]?.noBody && !/\[/.test(file) ? 1 : 0)
  const runs = files.filter((r) => FUZZ_ROUTES[r.file] && (!ONLY || r.file.includes(ONLY))).sort((a, b) => order(a.file) - order(b.file))
  it.each(runs.map((r) => [`${r.method} ${r.file}`, r] as const))('%s answers bad input with 4xx and writes nothing', async (_, r) => {
    await fuzz(r.file, r.method)
  }, 600_000)
})

// Images on findings and on work orders (the same service, two subjects): the finding's refusals are also in
// finding-images.test.ts; here both subjects get every kind of lie, so a subject added later is checked the same way.
describe('uploads', () => {
  const MB = 1024 * 1024
  const subjects = [
    { name: 'finding', kind: 'infrared', as: () => f.thermographer, base: () => `/api/orgs/${f.slug}/findings/${f.ids.finding}/attachments` },
    { name: 'work order', kind: 'repair', as: () => f.crew, base: () => `/api/orgs/${f.slug}/work-orders/${f.ids.workOrder}/attachments` },
  ]
  const rowOf = (id: string) => testDb().selectFrom('attachments').selectAll().where('id', '=', id).executeTakeFirstOrThrow()
  const count = async () => Number((await testDb().selectFrom('attachments').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()).n)

  describe.each(subjects)('to a $name', (subject) => {
    it('refuses declared types other than JPEG and PNG, empty and oversize files, and names too long, before presigning', async () => {
      const before = await count()
      const cases: Array<[Record<string, unknown>, string]> = [
        [{ contentType: 'image/gif' }, 'contentType'], [{ contentType: 'image/svg+xml' }, 'contentType'], [{ contentType: 'text/html' }, 'contentType'],
        [{ contentType: 'IMAGE/PNG' }, 'contentType'], [{ contentType: 'image/png; charset=utf-8' }, 'contentType'], [{ contentType: '' }, 'contentType'],
        [{ sizeBytes: 0 }, 'sizeBytes'], [{ sizeBytes: -1 }, 'sizeBytes'], [{ sizeBytes: 25 * MB + 1 }, 'sizeBytes'], [{ sizeBytes: 1.5 }, 'sizeBytes'],
        [{ sizeBytes: '100' }, 'sizeBytes'], [{ fileName: 'x'.repeat(1001) }, 'fileName'], [{ fileName: 42 }, 'fileName'], [{ kind: 'thermal' }, 'kind'],
      ]
      for (const [change, field] of cases) {
        const res = await subject.as().post(subject.base(), { kind: subject.kind, fileName: 'IR_0100.png', contentType: 'image/png', sizeBytes: 2048, ...change })
        expect(res.status, JSON.stringify(change)).toBe(400)
        expect(res.body.data.fieldErrors[field], JSON.stringify(change)).toBeDefined()
        expect(res.body.uploadUrl).toBeUndefined()
      }
      expect(await count()).toBe(before)
    })

    // Bytes whose content is not what was declared: each refused at complete with the file's field message, the
    // object deleted from storage, the row kept as refused and not listed.
    const lies: Array<[string, () => Promise<Uint8Array>, string, RegExp]> = [
      ['text named .jpg', async () => Buffer.from('Just some words in a file.\n'.repeat(30)), 'image/jpeg', /not a JPEG or PNG image by its content/],
      ['a PNG declared as JPEG', () => pngBytes(), 'image/jpeg', /content is PNG but it was declared as JPEG/],
      ['a JPEG declared as PNG', () => jpegBytes(64, 48), 'image/png', /content is JPEG but it was declared as PNG/],
      ['an SVG with a script declared as PNG', async () => Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), 'image/png', /not a JPEG or PNG image by its content/],
      ['an HTML page declared as JPEG', async () => Buffer.from('<!doctype html><html><body><script>alert(1)</script></body></html>'), 'image/jpeg', /not a JPEG or PNG image by its content/],
      ['a GIF declared as PNG', async () => Buffer.from('R0lGODlhAQABAIAAAAAAAP///yH5BAEAAAAALAAAAAABAAEAAAIBRAA7', 'base64'), 'image/png', /looks like GIF/],
      ['a PDF declared as JPEG', async () => Buffer.from('%PDF-1.4\n1 0 obj<<>>endobj\ntrailer<<>>\n%%EOF\n'), 'image/jpeg', /looks like PDF/],
      ['a PNG header with nothing after it', async () => (await pngBytes(200, 200)).subarray(0, 60), 'image/png', /could not be read/],
    ]
    it.each(lies)('refuses %s by its content', async (_, bytes, contentType, message) => {
      const { begin, complete } = await uploadImage(subject.as(), subject.base(), await bytes(), { kind: subject.kind, fileName: 'IR_0101.png', contentType })
      expect(begin.status).toBe(201)
      expect(complete!.status, JSON.stringify(complete!.body)).toBe(400)
      expect(complete!.body.data.message).toMatch(message)
      expect(complete!.body.data.fieldErrors.file).toEqual([complete!.body.data.message])
      const row = await rowOf(begin.body.attachment.id)
      expect(row.state).toBe('refused')
      expect(await objectExists(row.object_key)).toBe(false)
      const listed = (await subject.as().get(subject.base())).body as Array<{ id: string }>
      expect(listed.map((a) => a.id)).not.toContain(row.id)
    })

    it('refuses zero bytes sent for a declared size, and more bytes than declared', async () => {
      const begin = await subject.as().post(subject.base(), { kind: subject.kind, fileName: 'zero.png', contentType: 'image/png', sizeBytes: 500 })
      await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(0) })
      const complete = await subject.as().post(`${subject.base()}/${begin.body.attachment.id}/complete`)
      expect(complete.status).toBe(400)
      expect(complete.body.data.fieldErrors.file[0]).toMatch(/empty \(0 bytes\)/)
      const png = await pngBytes()
      const bigger = await uploadImage(subject.as(), subject.base(), png, { kind: subject.kind, sizeBytes: 100 })
      expect(bigger.complete!.status).toBe(400)
      expect(bigger.complete!.body.data.fieldErrors.file[0]).toMatch(new RegExp(`${png.length} bytes but 100 bytes were declared`))
    })

    it('refuses bytes sent with another content type than the one signed for', async () => {
      const png = await pngBytes()
      const begin = await subject.as().post(subject.base(), { kind: subject.kind, fileName: 'IR_0102.png', contentType: 'image/png', sizeBytes: png.length })
      const put = await fetch(begin.body.uploadUrl, { method: 'PUT', headers: { 'Content-Type': 'text/html' }, body: new Uint8Array(png) })
      const complete = await subject.as().post(`${subject.base()}/${begin.body.attachment.id}/complete`)
      const row = await rowOf(begin.body.attachment.id)
      if (put.ok) {
        // The local store (like some S3-compatible ones) keeps the type it was sent: complete refuses it.
        expect(complete.status).toBe(400)
        expect(complete.body.data.fieldErrors.file[0]).toMatch(/sent as text\/html, not as the declared PNG/)
        expect(row.state).toBe('refused')
        expect(await objectExists(row.object_key)).toBe(false)
      } else {
        // Amazon S3 holds the PUT to the signed Content-Type: nothing arrives, nothing can be completed.
        expect(put.status).toBe(403)
        expect(complete.status).toBe(409)
        expect(row.state).toBe('pending')
      }
    })

    it('keeps path tricks out of names and out of storage keys', async () => {
      const png = await pngBytes(16, 16)
      const cases: Array<[string, string]> = [
        ['../../etc/passwd', 'passwd'], ['..\\..\\windows\\system32\\config\\sam.png', 'sam.png'], ['C:\\x', 'x'], ['/absolute/IR.png', 'IR.png'],
        ['IR\u0000.png.exe', 'IR.png.exe'], ['.htaccess', 'htaccess'], ['   ', 'image'], ['%2e%2e%2fescape.png', '%2e%2e%2fescape.png'],
        ['\u202egnp.exe', 'gnp.exe'], ['name:with*bad?chars|.png', 'name_with_bad_chars_.png'], [`${'😀'.repeat(400)}.png`, `${'😀'.repeat(58)}.png`],
      ]
      for (const [raw, want] of cases) {
        const begin = await subject.as().post(subject.base(), { kind: subject.kind, fileName: raw, contentType: 'image/png', sizeBytes: png.length })
        expect(begin.status, JSON.stringify(raw)).toBe(201)
        expect(begin.body.attachment.fileName, JSON.stringify(raw)).toBe(want)
        const row = await rowOf(begin.body.attachment.id)
        expect(row.object_key).toBe(`orgs/${f.orgId}/attachments/${row.id}/original.png`)
      }
    })
  })

  it('keeps path tricks in a temperature grid\'s file name out of its storage key, and refuses NUL and over-long names', async () => {
    const base = `/api/orgs/${f.slug}/surveys/${f.ids.survey}/grids`
    const ok = await f.thermographer.post(base, { assetId: f.ids.asset, unit: 'C', fileName: '../../etc/passwd', csv: '20,21\n22,60\n' })
    expect(ok.status).toBe(201)
    const row = await testDb().selectFrom('temperature_grids').select(['object_key', 'file_name']).where('id', '=', ok.body.id).executeTakeFirstOrThrow()
    expect(row.object_key).toBe(`orgs/${f.orgId}/grids/${ok.body.id}.f32`)
    for (const fileName of ['grid\u0000.csv', 'x'.repeat(201), '']) {
      const res = await f.thermographer.post(base, { assetId: f.ids.asset, unit: 'C', fileName, csv: '20,21\n22,60\n' })
      expect(res.status, JSON.stringify(fileName).slice(0, 40)).toBe(400)
      expect(res.body.data.fieldErrors.fileName).toBeDefined()
    }
    const empty = await f.thermographer.post(base, { assetId: f.ids.asset, unit: 'C', fileName: 'empty.csv', csv: '' })
    expect(empty.status).toBe(400)
    expect(empty.body.data.fieldErrors.csv).toBeDefined()
  })
})

// next-auth's credentials sign-in speaks its own protocol (redirects and { url } answers), so it is not in the route
// table: here it gets the same kinds of values in its form fields. Never a 5xx or a trace, and never a session.
// Last in the file: the failures it records make the sign-in limit refuse this address for a while.
describe('sign-in', () => {
  it('answers fuzzed credentials without a 5xx and without ever signing anyone in', async () => {
    const rnd = prng(FUZZ_SEED ^ hash32('auth/[...].ts'))
    const client = new ApiClient()
    const csrf = (await client.get('/api/auth/csrf')).body.csrfToken as string
    const valid = { email: 'fenna@fuzz.test', password: 'not her password', csrfToken: csrf, callbackUrl: '/', json: 'true' }
    const values = [...NASTY_STRINGS, 'x'.repeat(1024 * 1024), 'javascript:alert(1)', '//evil.example/', 'http://evil.example/', 'FENNA@FUZZ.TEST', 'fenna@fuzz.test\u0000']
    const count = Math.max(60, Math.round(FUZZ_BODIES / 2))
    const problems: string[] = []
    const before = await databaseDigest(['audit_events'])
    for (let i = 0; i < count; i++) {
      const body: Record<string, string> = { ...valid }
      const field = rnd.pick(Object.keys(valid))
      if (rnd.next() < 0.15) delete body[field]
      else body[field] = rnd.pick(values)
      const asJson = rnd.next() < 0.2
      const payload = new TextEncoder().encode(asJson ? JSON.stringify(body) : new URLSearchParams(body).toString())
      const res = await client.raw('POST', '/api/auth/callback/credentials', payload, { 'content-type': asJson ? 'application/json' : 'application/x-www-form-urlencoded' })
      const issues = [
        res.status >= 500 && `server error ${res.status}`,
        STACK.test(res.text) && 'a stack trace in the answer',
        client.hasSession() && 'a session was issued',
      ].filter(Boolean)
      if (issues.length) problems.push(`#${i} ${field} ← ${describeValue(body[field])} (${asJson ? 'JSON' : 'form'}) → ${res.status} ${res.text.slice(0, 200)}: ${issues.join('; ')}`)
    }
    expect(problems, `FUZZ_SEED=${FUZZ_SEED}\n${problems.slice(0, 10).join('\n')}`).toEqual([])
    // Refused sign-ins are written to the attempt logs and copied into the audit log, and nowhere else.
    expect(changedTables(before, await databaseDigest(['audit_events']))).toEqual([])
  }, 300_000)
})
