import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/api'
import { type Cluster, startCluster, tickSlots, upstreamPort, waitFor } from '../support/cluster'
import { resetDatabase, testDb } from '../support/db'
import { testEnv } from '../support/env'
import { objectExists, pngBytes } from '../support/images'

// More than one machine: two processes of the built server behind nginx (scripts/lib/nginx.mjs) on loopback, sharing
// the test profile's PostgreSQL, object storage and SMTP. Sign-in through nginx holds on both instances; an image is
// presigned by one instance, PUT straight into object storage and completed by the other; the scheduler's 2-second
// ticks each run once across both; one instance is killed (SIGKILL) under a load of reads and writes through nginx and
// the other carries on. nginx adds X-Greybody-Upstream (the instance or instances it used) to every answer.

// The load runs at least minMs and minAnswers answers before the kill, and as much again after it (bounded by capMs),
// so a busy machine still gives enough requests on both sides of the kill.
const LOAD = { readers: 12, writers: 3, minMs: 2500, minAnswers: 60, capMs: 45_000 }
const email = 'cleo@cluster.test'
const password = 'cluster password'

let cluster: Cluster
let owner: ApiClient
let slug: string
let orgId: string
let siteId: string
let findingId: string

const ports = () => cluster.apps.map((a) => a.port)
/** The instances' last log lines, for a failure message. */
const logs = () => cluster.apps.map((a) => `\n--- instance :${a.port}\n${a.log.slice(-30).join('\n')}`).join('')

beforeAll(async () => {
  await resetDatabase()
  cluster = await startCluster({
    NUXT_SCHEDULER: 'on', NUXT_SCHEDULER_CRON: '*/2 * * * * *', NUXT_OUTBOX_WORKER: 'on', NUXT_OUTBOX_POLL_MS: '1000',
  })
  // Everything below goes through nginx, as a browser would.
  owner = new ApiClient(cluster.url)
  const up = await owner.post('/api/account/sign-up', { name: 'Cleo Planner', email, password, organisationName: 'Cleo Power' })
  expect(up.status, JSON.stringify(up.body) + logs()).toBe(201)
  slug = up.body.organisation.slug
  orgId = up.body.organisation.id ?? (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  await owner.signIn(email, password)
  expect(owner.hasSession()).toBe(true)
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'CL1', name: 'Cluster yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })
  expect(site.status, JSON.stringify(site.body)).toBe(201)
  siteId = site.body.id
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId, label: 'T1', assetClass: 'transformer' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'CL-1', bandFromUm: 8, bandToUm: 14 })
  // The owner runs the survey themself (owners may be assigned), so one session does everything.
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: up.body.user.id, instrumentId: inst.body.id, siteIds: [siteId] })
  expect(survey.status, JSON.stringify(survey.body)).toBe(201)
  await owner.post(`/api/orgs/${slug}/surveys/${survey.body.id}/start`, { version: survey.body.version })
  const finding = await owner.post(`/api/orgs/${slug}/surveys/${survey.body.id}/findings`, {
    assetId: asset.body.id, component: 'Bushing clamp', phase: 'L1', apparentC: 48, ambientC: 18, emissivity: 0.9,
    reflectedC: 18, reflectedMethod: 'reflector', probableCause: 'loose_connection',
  })
  expect(finding.status, JSON.stringify(finding.body)).toBe(201)
  findingId = finding.body.id
}, 120_000)

afterAll(async () => {
  await cluster?.stop()
})

describe('two app instances behind nginx', () => {
  it('signs in through nginx, and the session is good on either instance', async () => {
    const web = new ApiClient(cluster.url)
    const signIn = await web.signIn(email, password)
    expect(web.hasSession(), JSON.stringify(signIn.body)).toBe(true)
    expect(ports()).toContain(upstreamPort(signIn.headers))

    // Each instance, called directly with the same cookie, knows the person and lets them into the organisation.
    for (const app of cluster.apps) {
      const session = await web.at(app.url).get('/api/auth/session')
      expect(session.status).toBe(200)
      expect(session.body.user.email, app.url).toBe(email)
      const sites = await web.at(app.url).get(`/api/orgs/${slug}/sites`)
      expect(sites.status, app.url).toBe(200)
      expect(sites.body.items.map((s: { code: string }) => s.code)).toEqual(['CL1'])
      // Without the cookie the same instance refuses: the session, not the address, lets the person in.
      expect((await new ApiClient(app.url).get(`/api/orgs/${slug}/sites`)).status).toBe(401)
    }
    // Through nginx, requests alternate between the instances and every one of them is answered for the session.
    const seen = new Set<number | null>()
    for (let i = 0; i < 6; i++) {
      const res = await web.get(`/api/orgs/${slug}/sites`)
      expect(res.status).toBe(200)
      seen.add(upstreamPort(res.headers))
    }
    expect([...seen].sort()).toEqual([...ports()].sort())
  })

  it('takes nginx\'s address as the app\'s own origin for changes, and refuses another site\'s', async () => {
    const markRead = `/api/orgs/${slug}/notices/read`
    // What a browser on the public address sends, delivered to one instance: only NUXT_APP_URL (nginx's address)
    // makes that origin the instance's own, since the instance itself listens elsewhere.
    for (const app of cluster.apps) {
      const res = await owner.at(app.url).request('POST', markRead, { all: true }, false, { origin: cluster.url })
      expect(res.status, `${app.url}: ${JSON.stringify(res.body)}`).toBe(200)
    }
    const foreign = await owner.request('POST', markRead, { all: true }, false, { origin: 'http://127.0.0.1:1' })
    expect(foreign.status).toBe(403)
  })

  it('sends image bytes straight to object storage: presigned by one instance, completed by the other', async () => {
    const png = await pngBytes(320, 240)
    const base = `/api/orgs/${slug}/findings/${findingId}/attachments`
    const begin = await owner.post(base, { kind: 'infrared', fileName: 'IR_0100.png', contentType: 'image/png', sizeBytes: png.length })
    expect(begin.status, JSON.stringify(begin.body)).toBe(201)
    const presignedBy = upstreamPort(begin.headers)
    // The upload address is object storage's own, not nginx's: the bytes never pass through nginx or the app.
    const uploadUrl = new URL(begin.body.uploadUrl)
    expect(uploadUrl.origin).toBe(new URL(testEnv().NUXT_S3_ENDPOINT!).origin)
    expect(uploadUrl.origin).not.toBe(cluster.url)
    const put = await fetch(uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(png) })
    expect(put.status).toBe(200)

    const done = await owner.post(`${base}/${begin.body.attachment.id}/complete`)
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    expect(done.body).toMatchObject({ state: 'stored', sizeBytes: png.length })
    // nginx's round robin gave the completion to the other instance.
    const completedBy = upstreamPort(done.headers)
    expect(ports()).toContain(presignedBy)
    expect(ports()).toContain(completedBy)
    expect(completedBy).not.toBe(presignedBy)

    const row = await testDb().selectFrom('attachments').selectAll().where('id', '=', begin.body.attachment.id).executeTakeFirstOrThrow()
    expect(row.object_key).toBe(`orgs/${orgId}/attachments/${row.id}/original.png`)
    expect(await objectExists(row.object_key)).toBe(true)
    expect(await objectExists(row.thumbnail_key!)).toBe(true)
    const listed = await owner.get(base)
    expect(listed.body.map((a: { id: string }) => a.id)).toEqual([row.id])
    // nginx saw the two API calls and no upload.
    const access = readFileSync(cluster.nginx.accessLog, 'utf8').split('\n')
    expect(access.some((l) => l.includes(`"POST ${base}/${row.id}/complete `))).toBe(true)
    expect(access.filter((l) => l.includes('"PUT '))).toEqual([])
  })

  it('fires each scheduled tick on exactly one instance', async () => {
    const [a, b] = cluster.apps as [Cluster['apps'][0], Cluster['apps'][0]]
    const seenByBoth = () => {
      const sa = tickSlots(a.log)
      const sb = tickSlots(b.log)
      const inA = new Set([...sa.claimed, ...sa.skipped])
      return [...new Set([...sb.claimed, ...sb.skipped])].filter((s) => inA.has(s))
    }
    await waitFor('four ticks seen by both instances', async () => seenByBoth().length >= 4, 30_000)
      .catch((e) => { throw new Error(`${(e as Error).message}\nA:\n${a.log.join('\n')}\nB:\n${b.log.join('\n')}`) })
    const claimedA = tickSlots(a.log).claimed
    const claimedB = tickSlots(b.log).claimed
    for (const slot of seenByBoth()) expect([claimedA.includes(slot), claimedB.includes(slot)].filter(Boolean), slot).toHaveLength(1)
    // The claims in the database are exactly the runs the two logs report.
    const rows = await testDb().selectFrom('job_runs').select(['slot']).where('job', '=', 'notices-tick').execute()
    const logged = [...claimedA, ...claimedB]
    expect(rows.map((r) => r.slot).filter((s) => logged.includes(s)).sort()).toEqual([...logged].sort())
    console.log(`[cluster] scheduler: ${seenByBoth().length} ticks seen by both instances; A ran ${claimedA.length}, B ran ${claimedB.length}, none twice`)
  })

  it('carries on when one instance is killed under load: no read fails, no answered write is lost', async () => {
    const [victim, survivor] = cluster.apps as [Cluster['apps'][0], Cluster['apps'][0]]
    interface Sent { kind: 'read' | 'write'; path: string; label?: string; sentAt: number; doneAt: number; status?: number; upstream?: string | null; failure?: string }
    const sent: Sent[] = []
    const t0 = performance.now()
    let killedAt = 0
    let diedAt = 0 // when this process learnt that the instance had exited (a little after it really had)
    let endedAt = 0
    const now = () => performance.now() - t0
    const answeredAfterKill = () => sent.filter((s) => s.sentAt > killedAt).length
    const until = () => {
      if (endedAt) return false
      const done = now() > LOAD.capMs || (killedAt > 0 && now() - killedAt >= LOAD.minMs && answeredAfterKill() >= LOAD.minAnswers)
      if (done) endedAt = now()
      return !done
    }
    const send = async (kind: Sent['kind'], path: string, call: () => Promise<{ status: number; headers: Headers }>, label?: string) => {
      const s: Sent = { kind, path, label, sentAt: performance.now() - t0, doneAt: 0 }
      try {
        const res = await call()
        s.status = res.status
        s.upstream = res.headers.get('x-greybody-upstream')
      } catch (err) {
        s.failure = (err as Error).message
      }
      s.doneAt = performance.now() - t0
      sent.push(s)
    }
    const reads = [`/api/orgs/${slug}/sites`, `/api/orgs/${slug}/assets?pageSize=25`, '/api/auth/session', `/api/orgs/${slug}`]
    let n = 0
    const reader = async (r: number) => {
      for (let i = r; until(); i++) { const path = reads[i % reads.length]!; await send('read', path, () => owner.get(path)) }
    }
    const writer = async () => {
      while (until()) {
        const label = `LD-${++n}`
        await send('write', `/api/orgs/${slug}/assets`, () => owner.post(`/api/orgs/${slug}/assets`, { siteId, label, assetClass: 'breaker' }), label)
      }
    }
    const kill = (async () => {
      while ((now() < LOAD.minMs || sent.length < LOAD.minAnswers) && now() < LOAD.capMs / 2) await new Promise((r) => setTimeout(r, 50))
      victim.child.once('exit', () => { diedAt = now() })
      killedAt = now()
      victim.child.kill('SIGKILL')
    })()
    await Promise.all([kill, ...Array.from({ length: LOAD.readers }, (_, r) => reader(r)), ...Array.from({ length: LOAD.writers }, writer)])
    expect(victim.child.signalCode).toBe('SIGKILL')

    const ok = (s: Sent) => s.status !== undefined && s.status >= 200 && s.status < 300
    const readsSent = sent.filter((s) => s.kind === 'read')
    const writesSent = sent.filter((s) => s.kind === 'write')
    const failedReads = readsSent.filter((s) => !ok(s))
    const failedWrites = writesSent.filter((s) => !ok(s))
    const inFlightAtKill = sent.filter((s) => s.sentAt <= killedAt && s.doneAt >= killedAt)
    const retried = sent.filter((s) => s.upstream?.includes(','))
    const before = sent.filter((s) => s.doneAt < killedAt)
    const after = sent.filter((s) => s.sentAt > killedAt)
    const pct = (xs: Sent[], p: number) => {
      const d = xs.map((s) => s.doneAt - s.sentAt).sort((x, y) => x - y)
      return d.length ? Math.round(d[Math.min(d.length - 1, Math.floor((p / 100) * d.length))]!) : 0
    }
    const rate = (xs: Sent[], ms: number) => Math.round((xs.length / ms) * 1000)
    console.log([
      `[cluster] load through nginx for ${(endedAt / 1000).toFixed(1)} s (${LOAD.readers} readers, ${LOAD.writers} writers); instance :${victim.port} killed (SIGKILL) at ${(killedAt / 1000).toFixed(2)} s, its exit seen ${Math.round(diedAt - killedAt)} ms later`,
      `[cluster] requests: ${sent.length} (${readsSent.length} reads, ${writesSent.length} writes); in flight at the kill: ${inFlightAtKill.length}; retried by nginx on the other instance: ${retried.length}`,
      `[cluster] errors: reads ${failedReads.length}, writes ${failedWrites.length}${failedWrites.length ? ` (${failedWrites.map((s) => s.status ?? s.failure).join(', ')})` : ''}`,
      `[cluster] before the kill: ${rate(before, killedAt)} req/s, p50 ${pct(before, 50)} ms, p99 ${pct(before, 99)} ms; after: ${rate(after, endedAt - killedAt)} req/s, p50 ${pct(after, 50)} ms, p99 ${pct(after, 99)} ms; slowest answer in flight at the kill ${Math.round(Math.max(0, ...inFlightAtKill.map((s) => s.doneAt - s.sentAt)))} ms`,
    ].join('\n'))

    expect(before.length).toBeGreaterThanOrEqual(LOAD.minAnswers - LOAD.readers - LOAD.writers)
    expect(after.length).toBeGreaterThanOrEqual(LOAD.minAnswers)
    // Reads that were on the killed instance are repeated by nginx on the other one (proxy_next_upstream).
    expect(failedReads.map((s) => `${s.path}: ${s.status ?? s.failure} ${s.upstream ?? ''}`)).toEqual([])
    // A write nginx gave up on could only be one that had reached the killed instance before it was gone: 502, never
    // anything else (nginx does not repeat a POST the dead instance may have carried out).
    expect(diedAt).toBeGreaterThan(0)
    for (const s of failedWrites) {
      expect(s.status, s.failure).toBe(502)
      expect(s.sentAt).toBeLessThanOrEqual(diedAt)
    }
    // Every write answered 2xx is in the database, once.
    const labels = (await testDb().selectFrom('assets').select('label').where('organisation_id', '=', orgId).where('site_id', '=', siteId)
      .where('label', 'like', 'LD-%').execute()).map((r) => r.label)
    const answered = writesSent.filter(ok).map((s) => s.label!)
    expect(answered.filter((l) => !labels.includes(l))).toEqual([])
    expect(new Set(labels).size).toBe(labels.length)
    // A write refused with 502 may still have been carried out by the instance just before it died (the answer was lost).
    const failedLabels = failedWrites.map((s) => s.label!)
    console.log(`[cluster] writes: ${answered.length} answered 2xx, all ${answered.length} in the database; ${failedLabels.length} answered 502, of which ${failedLabels.filter((l) => labels.includes(l)).length} carried out before the instance died`)
    expect(labels.length).toBe(answered.length + failedLabels.filter((l) => labels.includes(l)).length)
    // Whatever was sent after the kill was answered by the survivor.
    const lateUpstreams = new Set(sent.filter((s) => s.sentAt > diedAt + 100).map((s) => Number(s.upstream?.split(',').pop()!.split(':').pop())))
    expect([...lateUpstreams]).toEqual([survivor.port])

    // The survivor serves everything: a fresh sign-in through nginx, and the scheduler keeps firing there alone.
    const fresh = new ApiClient(cluster.url)
    await fresh.signIn(email, password)
    expect(fresh.hasSession()).toBe(true)
    for (let i = 0; i < 4; i++) {
      const res = await fresh.get(`/api/orgs/${slug}/sites`)
      expect(res.status).toBe(200)
      expect(upstreamPort(res.headers)).toBe(survivor.port)
    }
    const claimedBefore = tickSlots(survivor.log).claimed.length
    await waitFor('two more ticks run by the survivor', async () => tickSlots(survivor.log).claimed.length >= claimedBefore + 2, 15_000)
  }, 90_000)
})
