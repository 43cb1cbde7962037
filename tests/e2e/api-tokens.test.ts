import { createHash } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { ApiClient } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { makeOrg, surveyWith, withToken, type Org } from '../support/integration-fixtures'
import { TOKEN_RATE_PER_MINUTE } from '../../shared/api-tokens'

let a: Org
let b: Org
let findingId: string
let workOrder: { id: string; version: number }
const base = () => inject('baseUrl')

async function createToken(org: Org, name: string, scope: 'read' | 'read_write') {
  const res = await org.owner.post(`/api/orgs/${org.slug}/api-tokens`, { name, scope })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return { id: res.body.token.id as string, secret: res.body.secret as string, body: res.body }
}

/** Audit rows are written just after the answer is sent: wait briefly for them. */
async function auditRows(tokenId: string, atLeast: number) {
  for (let i = 0; i < 40; i++) {
    const rows = await testDb().selectFrom('api_token_requests').selectAll().where('token_id', '=', tokenId).orderBy('id').execute()
    if (rows.length >= atLeast) return rows
    await new Promise((r) => setTimeout(r, 50))
  }
  return testDb().selectFrom('api_token_requests').selectAll().where('token_id', '=', tokenId).orderBy('id').execute()
}

beforeAll(async () => {
  await resetDatabase()
  a = await makeOrg('alpha', ['T1'])
  b = await makeOrg('beta', ['T1'])
  const s = await surveyWith(a, '2026-05-04', [{ asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 60, referenceC: 40 }])
  findingId = s.findingIds[0]!
  const wo = await a.owner.post(`/api/orgs/${a.slug}/work-orders`, { findingIds: [findingId] })
  expect(wo.status, JSON.stringify(wo.body)).toBe(201)
  workOrder = { id: wo.body.id, version: wo.body.version }
}, 120_000)

describe('creating a token', () => {
  it('shows the secret once and stores only its SHA-256', async () => {
    const t = await createToken(a, 'Maintenance system', 'read')
    expect(t.secret).toMatch(/^gbt_[A-Za-z0-9_-]{43}$/)
    const row = await testDb().selectFrom('api_tokens').selectAll().where('id', '=', t.id).executeTakeFirstOrThrow()
    expect(row.token_hash).toBe(createHash('sha256').update(t.secret).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(t.secret.slice(4))
    const list = await a.owner.get(`/api/orgs/${a.slug}/api-tokens`)
    expect(list.body.map((x: { id: string }) => x.id)).toContain(t.id)
    expect(JSON.stringify(list.body)).not.toContain(t.secret.slice(4))
    expect(list.body.find((x: { id: string }) => x.id === t.id)).toMatchObject({ name: 'Maintenance system', scope: 'read', lastUsedAt: null, revokedAt: null })
  })

  it('checks the name and scope at their fields', async () => {
    const res = await a.owner.post(`/api/orgs/${a.slug}/api-tokens`, { name: '', scope: 'admin' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fieldErrors).sort()).toEqual(['name', 'scope'])
  })
})

describe('a read token', () => {
  let t: Awaited<ReturnType<typeof createToken>>
  beforeAll(async () => { t = await createToken(a, 'Reader', 'read') })

  it('reads findings, one finding, checks, trends and work orders without any cookie', async () => {
    const list = await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/findings`)
    expect(list.status, JSON.stringify(list.body)).toBe(200)
    expect(list.body.items.map((f: { id: string }) => f.id)).toEqual([findingId])
    expect(list.headers.get('set-cookie')).toBeNull()
    expect((await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/findings/${findingId}`)).body.id).toBe(findingId)
    expect((await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/checks`)).status).toBe(200)
    expect((await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/assets/${a.assets.T1}/trends`)).status).toBe(200)
    expect((await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/work-orders`)).body.items[0].id).toBe(workOrder.id)
    const csv = await withToken(base(), t.secret, 'GET', `/api/orgs/${a.slug}/findings/export`)
    expect(csv.status).toBe(200)
    expect(csv.text).toContain(findingId)
  })

  it('cannot write, nor read members, billing or tokens', async () => {
    const move = await withToken(base(), t.secret, 'POST', `/api/orgs/${a.slug}/work-orders/${workOrder.id}/move`, { to: 'planned', version: workOrder.version })
    expect(move.status).toBe(403)
    expect(move.body.data.message).toMatch(/does not allow/)
    for (const [method, path, body] of [
      ['GET', `/api/orgs/${a.slug}/members`], ['GET', `/api/orgs/${a.slug}/billing`], ['GET', `/api/orgs/${a.slug}/api-tokens`],
      ['PATCH', `/api/orgs/${a.slug}`, { name: 'Renamed by a token', version: 1 }],
      ['POST', `/api/orgs/${a.slug}/api-tokens`, { name: 'More', scope: 'read_write' }],
    ] as const) {
      const res = await withToken(base(), t.secret, method, path, body)
      expect(res.status, `${method} ${path}`).toBe(403)
    }
    const wo = await a.owner.get(`/api/orgs/${a.slug}/work-orders/${workOrder.id}`)
    expect(wo.body.state).toBe('open')
  })

  it('works for its own organisation only', async () => {
    const other = await withToken(base(), t.secret, 'GET', `/api/orgs/${b.slug}/findings`)
    expect(other.status).toBe(404)
    // Nothing of beta's may come back (the echoed URL aside).
    const { url: _echo, ...rest } = other.body
    expect(JSON.stringify(rest)).not.toMatch(/beta/i)
    const bToken = await createToken(b, 'Beta reader', 'read')
    const cross = await withToken(base(), bToken.secret, 'GET', `/api/orgs/${a.slug}/findings/${findingId}`)
    expect(cross.status).toBe(404)
    const { url: _url, ...crossRest } = cross.body
    expect(JSON.stringify(crossRest)).not.toContain(findingId)
    // Routes outside organisations (one's own account, organisation list) take no token.
    expect((await withToken(base(), t.secret, 'GET', '/api/orgs')).status).toBe(401)
  })

  it('is refused with 401 once revoked, and unknown or malformed tokens are too', async () => {
    const r = await createToken(a, 'Short-lived', 'read')
    expect((await withToken(base(), r.secret, 'GET', `/api/orgs/${a.slug}/findings`)).status).toBe(200)
    const revoke = await a.owner.post(`/api/orgs/${a.slug}/api-tokens/${r.id}/revoke`)
    expect(revoke.status).toBe(200)
    expect(revoke.body.revokedAt).not.toBeNull()
    const after = await withToken(base(), r.secret, 'GET', `/api/orgs/${a.slug}/findings`)
    expect(after.status).toBe(401)
    expect(after.body.data.message).toMatch(/revoked/)
    expect((await withToken(base(), `gbt_${'x'.repeat(43)}`, 'GET', `/api/orgs/${a.slug}/findings`)).status).toBe(401)
    expect((await withToken(base(), 'not-a-token', 'GET', `/api/orgs/${a.slug}/findings`)).status).toBe(401)
    // Another organisation's owner cannot revoke it (404: not theirs).
    expect((await b.owner.post(`/api/orgs/${b.slug}/api-tokens/${t.id}/revoke`)).status).toBe(404)
  })

  it('is audited: method, path and status of each request, and the last-used time', async () => {
    const rows = await auditRows(t.id, 12)
    expect(rows.length).toBeGreaterThanOrEqual(12)
    expect(rows.every((r) => r.organisation_id && r.method && r.path.startsWith('/api/orgs/'))).toBe(true)
    expect(rows.map((r) => `${r.method} ${r.path} ${r.status}`)).toEqual(expect.arrayContaining([
      `GET /api/orgs/${a.slug}/findings 200`,
      `POST /api/orgs/${a.slug}/work-orders/${workOrder.id}/move 403`,
      `GET /api/orgs/${b.slug}/findings 404`,
    ]))
    // The query string is not kept.
    expect(rows.some((r) => r.path.includes('?'))).toBe(false)
    const page = await a.owner.get(`/api/orgs/${a.slug}/api-tokens/${t.id}/requests?pageSize=100`)
    expect(page.body.total).toBe(rows.length)
    const listed = (await a.owner.get(`/api/orgs/${a.slug}/api-tokens`)).body.find((x: { id: string }) => x.id === t.id)
    expect(listed.lastUsedAt).not.toBeNull()
  })
})

describe('a read-write token', () => {
  it('moves a work order between states, and makes no other change', async () => {
    const t = await createToken(a, 'Maintenance sync', 'read_write')
    const move = await withToken(base(), t.secret, 'POST', `/api/orgs/${a.slug}/work-orders/${workOrder.id}/move`, { to: 'planned', version: workOrder.version, note: 'Booked for Tuesday' })
    expect(move.status, JSON.stringify(move.body)).toBe(200)
    expect(move.body.state).toBe('planned')
    const stale = await withToken(base(), t.secret, 'POST', `/api/orgs/${a.slug}/work-orders/${workOrder.id}/move`, { to: 'in_repair', version: workOrder.version })
    expect(stale.status).toBe(409)
    const work = await withToken(base(), t.secret, 'POST', `/api/orgs/${a.slug}/work-orders/${workOrder.id}/work`, { workDone: 'By a token', version: move.body.version })
    expect(work.status).toBe(403)
    const plan = await withToken(base(), t.secret, 'POST', `/api/orgs/${a.slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: a.ownerId, instrumentId: a.instrumentId, siteIds: [a.siteId] })
    expect(plan.status).toBe(403)
    expect((await withToken(base(), t.secret, 'POST', `/api/orgs/${b.slug}/work-orders/${workOrder.id}/move`, { to: 'open', version: move.body.version })).status).toBe(404)
    const wo = await a.owner.get(`/api/orgs/${a.slug}/work-orders/${workOrder.id}`)
    expect(wo.body.state).toBe('planned')
  })
})

describe('rate limit', () => {
  it(`answers 429 with Retry-After beyond ${TOKEN_RATE_PER_MINUTE} requests in a minute, and logs it`, async () => {
    const t = await createToken(a, 'Busy system', 'read')
    // Start early in a minute so the burst stays inside one fixed window.
    while (new Date().getUTCSeconds() > 40) await new Promise((r) => setTimeout(r, 500))
    const statuses: number[] = []
    let retryAfter: string | null = null
    for (let i = 0; i < TOKEN_RATE_PER_MINUTE + 5; i++) {
      const res = await fetch(`${base()}/api/orgs/${a.slug}`, { headers: { authorization: `Bearer ${t.secret}` } })
      statuses.push(res.status)
      if (res.status === 429) retryAfter ??= res.headers.get('retry-after')
      await res.arrayBuffer()
    }
    expect(statuses.slice(0, TOKEN_RATE_PER_MINUTE).every((s) => s === 200)).toBe(true)
    expect(statuses.slice(TOKEN_RATE_PER_MINUTE)).toEqual([429, 429, 429, 429, 429])
    expect(Number(retryAfter)).toBeGreaterThanOrEqual(1)
    expect(Number(retryAfter)).toBeLessThanOrEqual(60)
    // Another token of the same organisation is not affected, nor is a person's session.
    const other = await createToken(a, 'Quiet system', 'read')
    expect((await withToken(base(), other.secret, 'GET', `/api/orgs/${a.slug}`)).status).toBe(200)
    expect((await a.owner.get(`/api/orgs/${a.slug}`)).status).toBe(200)
    const rows = await auditRows(t.id, TOKEN_RATE_PER_MINUTE + 5)
    expect(rows.filter((r) => r.status === 429)).toHaveLength(5)
  }, 90_000)
})

describe('token routes', () => {
  it('answer 401 without a session (roles are checked by the tenancy test)', async () => {
    const stranger = new ApiClient()
    expect((await stranger.get(`/api/orgs/${a.slug}/api-tokens`)).status).toBe(401)
  })
})
