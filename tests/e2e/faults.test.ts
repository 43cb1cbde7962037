import { spawn } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { connect, createServer, type AddressInfo, type Server, type Socket } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, type ApiResponse } from '../support/api'
import { type AppProcess, startAppProcess, stopAppProcess } from '../support/app-process'
import { resetDatabase, testDb } from '../support/db'
import { PROFILE, ROOT, testEnv } from '../support/env'
import { pngBytes } from '../support/images'
import { PG_BIN } from '../../scripts/lib/postgres.mjs'

// Faults: the profile's PostgreSQL stopped and started again in the middle of a load of finding saves, and object
// storage stopped in the middle of an image upload. The saves go to a separate process of the built server (so its
// log and its life can be watched) whose object storage is reached through a switchable loopback relay; the shared
// server of the other test files lives through the same database restart and is checked to answer afterwards.
// The third fault, SMTP stopped, is covered in notices.test.ts ("when the mail server is down": the message waits,
// is retried with back-off and arrives exactly once after SMTP comes back on the same port).

const LOAD = { saves: 300, concurrency: 16, paceMs: 20, outageAfter: 90, sentAfterBack: 60, holdDownMs: 1000 }

/** A loopback relay to a TCP service that can be switched off (connections refused) and on again at the same port. */
class Relay {
  private server: Server | undefined
  private sockets = new Set<Socket>()
  port = 0
  constructor(private readonly target: { host: string; port: number }) {}

  async on(): Promise<void> {
    const server = createServer((client) => {
      const upstream = connect(this.target.port, this.target.host)
      const end = () => { client.destroy(); upstream.destroy(); this.sockets.delete(client); this.sockets.delete(upstream) }
      for (const s of [client, upstream]) { this.sockets.add(s); s.on('error', end); s.on('close', end) }
      client.pipe(upstream)
      upstream.pipe(client)
    })
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject)
      server.listen(this.port, '127.0.0.1', () => resolve())
    })
    this.port = (server.address() as AddressInfo).port
    this.server = server
  }

  async off(): Promise<void> {
    const server = this.server
    this.server = undefined
    for (const s of this.sockets) s.destroy()
    this.sockets.clear()
    if (server) await new Promise<void>((r) => server.close(() => r()))
  }
}

/** pg_ctl on the test profile's cluster, as the cluster's owner (root runs it through runuser, as scripts/lib/postgres.mjs does). */
function pgCtl(args: string[]): Promise<void> {
  const bin = `${PG_BIN}/pg_ctl`
  const [cmd, argv] = process.getuid?.() === 0 ? ['runuser', ['-u', 'postgres', '--', bin, ...args]] : [bin, args]
  return new Promise((resolve, reject) => {
    // No pipes: the postmaster that `start` leaves behind must not hold our stdio open.
    const child = spawn(cmd as string, argv as string[], { stdio: 'ignore' })
    child.once('error', reject)
    child.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`pg_ctl ${args[0]} exited with ${code}`))))
  })
}

function postgresOfProfile(): { dataDir: string; log: string } {
  const state = JSON.parse(readFileSync(`${ROOT}.data/${PROFILE}/state.json`, 'utf8'))
  return { dataDir: state.postgres.dataDir, log: state.postgres.log }
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

let app: AppProcess | undefined
let relay: Relay
let shared: ApiClient
let client: ApiClient
let slug: string
let surveyId: string
let assetIds: string[] = []
const email = 'fay@faults.test'
const password = 'faults password'

const reading = (component: string, assetId: string) => ({
  assetId, component, phase: 'L1', apparentC: 25, ambientC: 20, emissivity: 0.95, reflectedC: 20, reflectedMethod: 'reflector',
  probableCause: 'loose_connection',
})

beforeAll(async () => {
  await resetDatabase()
  let ownerId: string
  ;({ client: shared, slug, userId: ownerId } = await signUpOwner('Fay Planner', email, 'Fay Power', password))
  const site = await shared.post(`/api/orgs/${slug}/sites`, { code: 'FT1', name: 'Fault yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })
  for (const label of ['T1', 'T2', 'T3', 'T4']) {
    const a = await shared.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label, assetClass: 'transformer' })
    assetIds.push(a.body.id)
  }
  const inst = await shared.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'FT-1', bandFromUm: 8, bandToUm: 14 })
  // The owner runs the survey themself (owners may be assigned), so one session does everything.
  const survey = await shared.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: ownerId, instrumentId: inst.body.id, siteIds: [site.body.id] })
  expect(survey.status, JSON.stringify(survey.body)).toBe(201)
  surveyId = survey.body.id
  const start = await shared.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: survey.body.version })
  expect(start.status, JSON.stringify(start.body)).toBe(200)

  const s3 = new URL(testEnv().NUXT_S3_ENDPOINT!)
  relay = new Relay({ host: s3.hostname, port: Number(s3.port) })
  await relay.on()
  app = await startAppProcess({ NUXT_S3_ENDPOINT: `http://127.0.0.1:${relay.port}`, GREYBODY_REPORT_WORKER: 'off' })
  client = new ApiClient(app.url)
  await client.signIn(email, password)
  expect(client.hasSession()).toBe(true)
}, 120_000)

afterAll(async () => {
  await stopAppProcess(app)
  await relay?.off()
})

describe('PostgreSQL restarted in the middle of a load of finding saves', () => {
  interface Save { i: number; key: string; body: ReturnType<typeof reading>; sentAt: number; answeredAt: number; res?: ApiResponse; failure?: string }
  const saves: Save[] = []
  const findingsUrl = () => `/api/orgs/${slug}/surveys/${surveyId}/findings`
  const send = (s: Pick<Save, 'key' | 'body'>) => client.request('POST', findingsUrl(), s.body, false, { 'idempotency-key': s.key })
  const ok = (r?: ApiResponse) => !!r && r.status >= 200 && r.status < 300
  const times = { stopAsked: 0, stopped: 0, startAsked: 0, back: 0 }

  it('answers every save either 2xx (and keeps it) or 503 with a plain message, and recovers by itself', async () => {
    const warm = await send({ key: randomUUID(), body: reading('Warm-up clamp', assetIds[0]!) })
    expect(warm.status, JSON.stringify(warm.body)).toBe(201)
    const { dataDir, log } = postgresOfProfile()

    let outage: Promise<void> | undefined
    let outageFailed: unknown = null
    const t0 = performance.now()
    let next = 0
    // The load goes on until PostgreSQL has been back for a while (bounded, should the restart itself fail).
    const moreToSend = () => next < LOAD.saves
      || (!outageFailed && next < 5 * LOAD.saves && (!times.back || saves.filter((s) => s.sentAt >= times.back).length < LOAD.sentAfterBack))
    const worker = async () => {
      while (moreToSend()) {
        const i = next++
        // Paced, so that the load spans the outage and goes on after it.
        const due = t0 + i * LOAD.paceMs
        if (performance.now() < due) await sleep(due - performance.now())
        if (i === LOAD.outageAfter) {
          outage = (async () => {
            times.stopAsked = performance.now()
            await pgCtl(['stop', '-D', dataDir, '-m', 'fast', '-w', '-t', '60', '-s'])
            times.stopped = performance.now()
            await sleep(LOAD.holdDownMs)
            times.startAsked = performance.now()
            await pgCtl(['start', '-D', dataDir, '-l', log, '-w', '-t', '60', '-s'])
            times.back = performance.now()
          })().catch((e) => { outageFailed = e ?? new Error('restart failed') })
        }
        const s: Save = { i, key: randomUUID(), body: reading(`Load clamp ${String(i).padStart(4, '0')}`, assetIds[i % assetIds.length]!), sentAt: performance.now(), answeredAt: 0 }
        saves.push(s)
        try {
          s.res = await send(s)
        } catch (e) {
          s.failure = String((e as Error).cause ?? e)
        }
        s.answeredAt = performance.now()
      }
    }
    try {
      await Promise.all(Array.from({ length: LOAD.concurrency }, worker))
    } finally {
      await outage
    }
    if (outageFailed) throw outageFailed

    const done = saves.filter((s) => ok(s.res))
    const refused = saves.filter((s) => !ok(s.res))
    const byStatus: Record<string, number> = {}
    for (const s of refused) byStatus[s.res ? String(s.res.status) : 'no answer'] = (byStatus[s.res ? String(s.res.status) : 'no answer'] ?? 0) + 1
    const firstAfterBack = done.filter((s) => s.sentAt >= times.back).sort((a, b) => a.answeredAt - b.answeredAt)[0]
    const recoveryMs = firstAfterBack ? Math.round(firstAfterBack.answeredAt - times.back) : null
    const found = await testDb().selectFrom('findings').select('id').where('id', 'in', done.map((s) => s.res!.body.id as string)).execute()
    const stored = await testDb().selectFrom('findings').select((eb) => eb.fn.countAll<number>().as('n')).where('component', 'like', 'Load clamp %').executeTakeFirstOrThrow()
    console.log(`[faults] saves sent ${saves.length} (concurrency ${LOAD.concurrency}); 2xx ${done.length}, found in the database by id ${found.length}, `
      + `rows of the load ${stored.n}; refused ${refused.length} ${JSON.stringify(byStatus)}; PostgreSQL stop ${Math.round(times.stopped - times.stopAsked)} ms, `
      + `down ${Math.round(times.back - times.stopped)} ms (start took ${Math.round(times.back - times.startAsked)} ms); `
      + `first 2xx ${recoveryMs} ms after PostgreSQL accepted connections again; load took ${Math.round(performance.now() - t0)} ms`)

    // The app process lived through it: no request went unanswered, it is still running and logged no raw 500.
    expect(saves.filter((s) => s.failure).map((s) => s.failure)).toEqual([])
    expect(app!.child.exitCode).toBeNull()
    expect(app!.log.filter((l) => /\[unhandled\]/.test(l))).toEqual([])
    console.log(`[faults] the app logged: ${app!.log.filter((l) => l.startsWith('[unavailable]')).slice(0, 4).join(' | ')}`)
    // Some saves fell into the outage (otherwise this test proved nothing) and some were answered before it.
    expect(refused.length).toBeGreaterThan(0)
    expect(done.filter((s) => s.answeredAt < times.stopAsked).length).toBeGreaterThan(0)
    // Every save answered 2xx is in the database; nothing else of the load was written.
    expect(found.length).toBe(done.length)
    expect(Number(stored.n)).toBe(done.length)
    // Every other save got a 503 with a plain message and a Retry-After, never a bare 500.
    for (const s of refused) {
      expect(s.res!.status, JSON.stringify(s.res!.body)).toBe(503)
      expect(s.res!.body.data.message).toMatch(/database is unavailable/i)
      expect(Number(s.res!.headers.get('retry-after'))).toBeGreaterThan(0)
    }
    // Recovered by itself, under load: every save sent a second after PostgreSQL was back succeeded.
    expect(recoveryMs).not.toBeNull()
    expect(recoveryMs!).toBeLessThan(10_000)
    const late = saves.filter((s) => s.sentAt >= times.back + 1000)
    expect(late.length).toBeGreaterThan(0)
    expect(late.filter((s) => !ok(s.res)).map((s) => s.res?.status)).toEqual([])
  }, 90_000)

  it('makes exactly one copy of each refused save sent again with its Idempotency-Key', async () => {
    const refused = saves.filter((s) => !ok(s.res))
    expect(refused.length).toBeGreaterThan(0)
    const until = Date.now() + 30_000
    let stillBeingSaved = 0
    for (const s of refused) {
      let res = await send(s)
      // A key whose claim could not be released while the database was away is freed as soon as it is back.
      while (res.status === 409 && Date.now() < until) { stillBeingSaved++; await sleep(200); res = await send(s) }
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      s.res = res
    }
    // Sent once more, every save of the load comes back as stored, without a second copy.
    const queue = [...saves]
    const replays: ApiResponse[] = []
    await Promise.all(Array.from({ length: LOAD.concurrency }, async () => {
      for (let s = queue.shift(); s; s = queue.shift()) {
        const res = await send(s)
        expect(res.status).toBe(201)
        expect(res.body.id).toBe(s.res!.body.id)
        replays.push(res)
      }
    }))
    expect(replays.filter((r) => r.headers.get('idempotent-replayed') === 'true')).toHaveLength(saves.length)
    const rows = await testDb().selectFrom('findings').select(['component']).select((eb) => eb.fn.countAll<number>().as('n'))
      .where('component', 'like', 'Load clamp %').groupBy('component').execute()
    expect(rows).toHaveLength(saves.length)
    expect(rows.filter((r) => Number(r.n) !== 1)).toEqual([])
    // No claim is left waiting for an answer.
    const waiting = await testDb().selectFrom('idempotency_keys').select('key').where('status_code', 'is', null).execute()
    expect(waiting).toEqual([])
    const settledLater = app!.log.filter((l) => l.startsWith('[idempotency] a key was settled')).length
    console.log(`[faults] ${refused.length} refused saves sent again: ${refused.length} stored once each (${stillBeingSaved} "still being saved" answers on the way, `
      + `${settledLater} keys settled by the app once the database was back); ${saves.length} replays, no copy`)
  }, 90_000)

  it('leaves the shared server answering for the next test files', async () => {
    expect((await fetch(`${shared.baseUrl}/api/health`)).status).toBe(200)
    const list = await shared.get(`/api/orgs/${slug}/findings?surveyId=${surveyId}&pageSize=1`)
    expect(list.status, JSON.stringify(list.body)).toBe(200)
    expect(list.body.total).toBe(saves.length + 1)
  })
})

describe('object storage stopped in the middle of an image upload', () => {
  let findingId: string
  const base = () => `/api/orgs/${slug}/findings/${findingId}/attachments`

  it('refuses to complete the upload with a plain 503, keeps the finding, and takes the image once storage is back', async () => {
    const f = await client.request('POST', `/api/orgs/${slug}/surveys/${surveyId}/findings`, reading('Image clamp', assetIds[1]!))
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    findingId = f.body.id
    const png = await pngBytes(64, 48)
    const begin1 = await client.post(base(), { kind: 'infrared', fileName: 'IR_0100.png', contentType: 'image/png', sizeBytes: png.length })
    expect(begin1.status).toBe(201)
    expect((await fetch(begin1.body.uploadUrl, { method: 'PUT', headers: begin1.body.headers, body: new Uint8Array(png) })).status).toBe(200)
    expect((await client.post(`${base()}/${begin1.body.attachment.id}/complete`)).status).toBe(200)
    const before = await client.get(`/api/orgs/${slug}/findings/${findingId}`)
    expect(before.status).toBe(200)

    await relay.off()
    // Presigning needs no storage round trip, so the upload can begin; the bytes cannot reach storage.
    const begin = await client.post(base(), { kind: 'visible', fileName: 'DC_0101.png', contentType: 'image/png', sizeBytes: png.length })
    expect(begin.status, JSON.stringify(begin.body)).toBe(201)
    const id = begin.body.attachment.id as string
    await expect(fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(png) })).rejects.toThrow()
    const complete = await client.post(`${base()}/${id}/complete`)
    expect(complete.status, JSON.stringify(complete.body)).toBe(503)
    expect(complete.body.data.message).toMatch(/storage is unavailable/i)
    expect(Number(complete.headers.get('retry-after'))).toBeGreaterThan(0)
    // The attachment waits (not refused), the finding is unchanged and still read, with its stored image listed.
    const row = await testDb().selectFrom('attachments').select(['state', 'refused_reason']).where('id', '=', id).executeTakeFirstOrThrow()
    expect(row).toEqual({ state: 'pending', refused_reason: null })
    const during = await client.get(`/api/orgs/${slug}/findings/${findingId}`)
    expect(during.status).toBe(200)
    expect(during.body).toEqual(before.body)
    const listed = await client.get(base())
    expect(listed.status).toBe(200)
    expect(listed.body.map((a: { id: string }) => a.id)).toEqual([begin1.body.attachment.id])
    expect(app!.log.filter((l) => /\[unhandled\]/.test(l))).toEqual([])

    await relay.on()
    // The same upload link is sent again once storage answers, and the image is taken.
    expect((await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(png) })).status).toBe(200)
    const again = await client.post(`${base()}/${id}/complete`)
    expect(again.status, JSON.stringify(again.body)).toBe(200)
    expect(again.body.state).toBe('stored')
    expect((await client.get(base())).body).toHaveLength(2)
  }, 60_000)
})
