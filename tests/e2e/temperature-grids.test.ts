import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase } from '../support/db'
import { GRID_LIMITS, gridFromBytes } from '../../shared/thermal/grid'

let owner: ApiClient
let slug: string
let surveyId: string
let assetId: string
let otherSurveyAssetId: string
const people: Record<string, { client: ApiClient; id: string }> = {}

async function join(key: string, role: string, email: string) {
  people[key] = await joinByInvitation(owner, slug, email, role, `Grid ${key}`, 'grid password')
}

/** The raw bytes of a GET (the API client reads text). */
async function bytesOf(client: ApiClient, path: string): Promise<{ status: number; bytes: Uint8Array; headers: Headers }> {
  const cookie = (client as unknown as { cookieHeader(): string }).cookieHeader()
  const res = await fetch(`${client.baseUrl}${path}`, { headers: { cookie } })
  return { status: res.status, bytes: new Uint8Array(await res.arrayBuffer()), headers: res.headers }
}

const upload = (client: ApiClient, body: Record<string, unknown>) => client.post(`/api/orgs/${slug}/surveys/${surveyId}/grids`, body)

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Gail Planner', 'gail@grids.test', 'Gail Power'))
  await join('thermo', 'thermographer', 'tom@grids.test')
  await join('other', 'thermographer', 'ola@grids.test')
  await join('viewer', 'viewer', 'val@grids.test')
  await join('crew', 'crew', 'cid@grids.test')
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'G1', name: 'Grid yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })
  const elsewhere = await owner.post(`/api/orgs/${slug}/sites`, { code: 'G2', name: 'Elsewhere', kind: 'substation', latitude: 54.2, longitude: -2.9 })
  assetId = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'CB7', assetClass: 'breaker' })).body.id
  otherSurveyAssetId = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: elsewhere.body.id, label: 'T9', assetClass: 'transformer' })).body.id
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'G-814', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: people.thermo!.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  surveyId = survey.body.id
}, 60_000)

describe('attaching a grid', () => {
  it('refuses before the survey is started', async () => {
    const res = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'early.csv', csv: '1,2\n3,4' })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/Start the survey first/)
    await people.thermo!.client.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: 1 })
  })

  let gridId: string
  it('stores a °C grid and gives its shape, range and the instrument band', async () => {
    const csv = '20.5;21,25;22\n23;85,5;-3\n\n'
    const res = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'cb7.csv', csv })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    gridId = res.body.id
    expect(res.body).toMatchObject({ width: 3, height: 2, sourceUnit: 'C', fileName: 'cb7.csv', minC: -3, maxC: 85.5, surveyId, assetId, findingId: null, band: { fromUm: 8, toUm: 14 }, hotRegion: null })
    const meta = await people.viewer!.client.get(`/api/orgs/${slug}/grids/${gridId}`)
    expect(meta.status).toBe(200)
    expect(meta.body.id).toBe(gridId)
    const values = await bytesOf(people.viewer!.client, `/api/orgs/${slug}/grids/${gridId}/values`)
    expect(values.status).toBe(200)
    expect(values.headers.get('content-type')).toContain('application/octet-stream')
    expect(values.bytes.byteLength).toBe(24)
    expect(Array.from(gridFromBytes(values.bytes))).toEqual([20.5, 21.25, 22, 23, 85.5, -3])
  })

  it('converts a °F grid to °C (°C = (°F − 32) × 5/9)', async () => {
    const res = await upload(people.thermo!.client, { assetId, unit: 'F', fileName: 'f.csv', csv: '32\t212\n-40\t98.6\n' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.sourceUnit).toBe('F')
    expect(res.body.minC).toBeCloseTo(-40, 4)
    expect(res.body.maxC).toBeCloseTo(100, 4)
    const v = gridFromBytes((await bytesOf(people.thermo!.client, `/api/orgs/${slug}/grids/${res.body.id}/values`)).bytes)
    expect(v[0]).toBeCloseTo(0, 4)
    expect(v[3]).toBeCloseTo(37, 4)
  })

  it('stores a 640 × 480 grid', async () => {
    const row = Array.from({ length: 640 }, (_, i) => (20 + i / 64).toFixed(3)).join(',')
    const csv = Array.from({ length: 480 }, (_, r) => (r === 240 ? row.replace(/^[^,]+/, '612.5') : row)).join('\n')
    const res = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'vga.csv', csv })
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(201)
    expect([res.body.width, res.body.height, res.body.maxC]).toEqual([640, 480, 612.5])
    const v = await bytesOf(people.thermo!.client, `/api/orgs/${slug}/grids/${res.body.id}/values`)
    expect(v.bytes.byteLength).toBe(640 * 480 * 4)
    expect(gridFromBytes(v.bytes)[240 * 640]).toBe(612.5)
  })

  it('refuses bad grids with the row and column in the message', async () => {
    const word = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'bad.csv', csv: '1,2,3\n4,hot,6\n' })
    expect(word.status).toBe(400)
    expect(word.body.data.message).toBe('Row 2, column 2: “hot” is not a number.')
    expect(word.body.data.fieldErrors.csv).toEqual([word.body.data.message])
    expect(word.body.data.problem).toEqual({ row: 2, column: 2 })
    const ragged = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'bad.csv', csv: '1,2,3\n4,5\n' })
    expect(ragged.status).toBe(400)
    expect(ragged.body.data.message).toMatch(/^Row 2 has 2 values; row 1 has 3/)
    const hot = await upload(people.thermo!.client, { assetId, unit: 'F', fileName: 'bad.csv', csv: '70,70\n70,4000\n' })
    expect(hot.status).toBe(400)
    expect(hot.body.data.message).toBe('Row 2, column 2: 4000 °F is outside −76 °F to 3632 °F.')
    const empty = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'bad.csv', csv: '' })
    expect(empty.status).toBe(400)
    expect(empty.body.data.fieldErrors.csv).toBeTruthy()
    const noUnit = await upload(people.thermo!.client, { assetId, unit: 'K', fileName: 'bad.csv', csv: '1,2\n3,4' })
    expect(noUnit.body.data.fieldErrors.unit).toBeTruthy()
  })

  it('refuses a grid that is too big', async () => {
    const wide = Array.from({ length: GRID_LIMITS.maxWidth + 1 }, () => '20').join(',')
    const res = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'wide.csv', csv: `${wide}\n${wide}` })
    expect(res.status).toBe(400)
    expect(res.body.data.message).toBe(`Row 1 has more than ${GRID_LIMITS.maxWidth} values; at most ${GRID_LIMITS.maxWidth} columns are accepted.`)
    const tall = Array.from({ length: GRID_LIMITS.maxHeight + 1 }, () => '20,21').join('\n')
    const res2 = await upload(people.thermo!.client, { assetId, unit: 'C', fileName: 'tall.csv', csv: tall })
    expect(res2.status).toBe(400)
    expect(res2.body.data.message).toMatch(/at most 1024 are accepted/)
  })

  it('refuses an asset that is not on the survey', async () => {
    const res = await upload(people.thermo!.client, { assetId: otherSurveyAssetId, unit: 'C', fileName: 'x.csv', csv: '1,2\n3,4' })
    expect(res.status).toBe(400)
    expect(res.body.data.fieldErrors.assetId).toBeTruthy()
  })

  it('lets only the assigned thermographer attach and mark; viewers and crew read', async () => {
    const other = await upload(people.other!.client, { assetId, unit: 'C', fileName: 'x.csv', csv: '1,2\n3,4' })
    expect(other.status).toBe(403)
    expect(other.body.data.message).toMatch(/assigned/)
    const manager = await upload(owner, { assetId, unit: 'C', fileName: 'x.csv', csv: '1,2\n3,4' })
    expect(manager.status).toBe(403)
    expect((await upload(people.viewer!.client, { assetId, unit: 'C', fileName: 'x.csv', csv: '1,2\n3,4' })).status).toBe(403)
    expect((await people.crew!.client.get(`/api/orgs/${slug}/grids/${gridId}`)).status).toBe(200)
    const mark = await people.other!.client.post(`/api/orgs/${slug}/grids/${gridId}/regions`, { hot: { shape: 'box', x: 0, y: 0, w: 1, h: 1 }, reference: null })
    expect(mark.status).toBe(403)
  })

  it('saves marked regions inside the grid and refuses ones reaching past it', async () => {
    const c = people.thermo!.client
    const ok = await c.post(`/api/orgs/${slug}/grids/${gridId}/regions`, { hot: { shape: 'ellipse', x: 1, y: 0, w: 2, h: 2 }, reference: { shape: 'box', x: 0, y: 0, w: 1, h: 2 } })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect(ok.body.hotRegion).toEqual({ shape: 'ellipse', x: 1, y: 0, w: 2, h: 2 })
    expect((await c.get(`/api/orgs/${slug}/grids/${gridId}`)).body.referenceRegion).toEqual({ shape: 'box', x: 0, y: 0, w: 1, h: 2 })
    const past = await c.post(`/api/orgs/${slug}/grids/${gridId}/regions`, { hot: { shape: 'box', x: 2, y: 0, w: 2, h: 1 }, reference: null })
    expect(past.status).toBe(400)
    expect(past.body.data.fieldErrors.hot[0]).toMatch(/past the grid \(3 × 2/)
    const negative = await c.post(`/api/orgs/${slug}/grids/${gridId}/regions`, { hot: { shape: 'box', x: -1, y: 0, w: 2, h: 1 }, reference: null })
    expect(negative.status).toBe(400)
  })

  it('links the grid to the finding saved with it, once', async () => {
    const c = people.thermo!.client
    const reading = { assetId, component: 'Line-side lug', apparentC: 85.5, referenceC: 21.3, emissivity: 0.9, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'loose_connection', gridId }
    const f = await c.post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, reading)
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    expect((await c.get(`/api/orgs/${slug}/grids/${gridId}`)).body.findingId).toBe(f.body.id)
    const again = await c.post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, { ...reading, component: 'Second lug' })
    expect(again.status).toBe(400)
    expect(again.body.data.fieldErrors.gridId[0]).toMatch(/already backs another finding/)
    const unknown = await c.post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, { ...reading, component: 'Third lug', gridId: '00000000-0000-4000-8000-000000000000' })
    expect(unknown.status).toBe(400)
    expect(unknown.body.data.fieldErrors.gridId).toBeTruthy()
  })

  it('answers 404 for an unknown grid id', async () => {
    expect((await owner.get(`/api/orgs/${slug}/grids/00000000-0000-4000-8000-000000000000`)).status).toBe(404)
    expect((await owner.get(`/api/orgs/${slug}/grids/00000000-0000-4000-8000-000000000000/values`)).status).toBe(404)
  })
})
