import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { jpegBytes, objectExists, pngBytes, uploadImage } from '../support/images'

// Images on findings: begin (presigned PUT) → the bytes straight to the local S3 → complete (checked by real size and
// content, thumbnail made) → listed with short-lived links. Refusals, names, roles and tenancy.

let owner: ApiClient
let slug: string
let orgId: string
let surveyId: string
let findingId: string
const people: Record<string, { client: ApiClient; id: string }> = {}
const MB = 1024 * 1024

async function join(key: string, role: string, email: string) {
  people[key] = await joinByInvitation(owner, slug, email, role, `Images ${key}`, 'images password')
}

const base = () => `/api/orgs/${slug}/findings/${findingId}/attachments`
const thermo = () => people.thermo!.client

async function rowOf(id: string) {
  return testDb().selectFrom('attachments').selectAll().where('id', '=', id).executeTakeFirstOrThrow()
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Ivy Planner', 'ivy@images.test', 'Ivy Power'))
  orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  await join('thermo', 'thermographer', 'theo@images.test')
  await join('other', 'thermographer', 'olga@images.test')
  await join('crew', 'crew', 'cris@images.test')
  await join('viewer', 'viewer', 'vic@images.test')
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'IM1', name: 'Image yard', kind: 'substation', latitude: 54.1, longitude: -2.9 })
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'T1', assetClass: 'transformer' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'IM-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: people.thermo!.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  surveyId = survey.body.id
  await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: survey.body.version })
  const finding = await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/findings`, {
    assetId: asset.body.id, component: 'Bushing clamp', phase: 'L1', apparentC: 48, ambientC: 18, emissivity: 0.9,
    reflectedC: 18, reflectedMethod: 'reflector', probableCause: 'loose_connection',
  })
  expect(finding.status, JSON.stringify(finding.body)).toBe(201)
  findingId = finding.body.id
}, 60_000)

describe('uploading an image to a finding', () => {
  let png: Buffer
  let attachmentId: string

  it('begins with a presigned PUT, takes the bytes straight into storage and stores them after checking', async () => {
    png = await pngBytes(640, 480)
    const begin = await thermo().post(base(), { kind: 'infrared', fileName: 'IR_0001.png', contentType: 'image/png', sizeBytes: png.length })
    expect(begin.status, JSON.stringify(begin.body)).toBe(201)
    expect(begin.body.method).toBe('PUT')
    expect(begin.body.headers).toEqual({ 'Content-Type': 'image/png' })
    expect(begin.body.attachment).toMatchObject({ state: 'pending', kind: 'infrared', fileName: 'IR_0001.png', sizeBytes: png.length, thumbnailUrl: null })
    attachmentId = begin.body.attachment.id
    // Nothing is listed while pending.
    expect((await thermo().get(base())).body).toEqual([])

    const put = await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(png) })
    expect(put.status).toBe(200)
    const done = await thermo().post(`${base()}/${attachmentId}/complete`)
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    expect(done.body).toMatchObject({ id: attachmentId, state: 'stored', contentType: 'image/png', sizeBytes: png.length, uploadedBy: { id: people.thermo!.id } })
    expect(done.body.storedAt).toBeTruthy()

    // Stored under the organisation's prefix, thumbnail beside it; the file name never reaches the key.
    const row = await rowOf(attachmentId)
    expect(row.object_key).toBe(`orgs/${orgId}/attachments/${attachmentId}/original.png`)
    expect(row.thumbnail_key).toBe(`orgs/${orgId}/attachments/${attachmentId}/thumbnail.jpg`)
    expect(await objectExists(row.thumbnail_key!)).toBe(true)
  })

  it('lists it with a JPEG thumbnail of about 320 px and the full image, both readable', async () => {
    const list = await people.viewer!.client.get(base())
    expect(list.status).toBe(200)
    expect(list.body).toHaveLength(1)
    const [item] = list.body
    const thumb = Buffer.from(await (await fetch(item.thumbnailUrl)).arrayBuffer())
    expect([...thumb.subarray(0, 3)]).toEqual([0xff, 0xd8, 0xff])
    const meta = await sharp(thumb).metadata()
    expect(meta.format).toBe('jpeg')
    // 640 × 480 fitted inside 320 × 320 keeps the aspect ratio: 320 × 240.
    expect([meta.width, meta.height]).toEqual([320, 240])
    const full = Buffer.from(await (await fetch(item.fullUrl)).arrayBuffer())
    expect(full.equals(png)).toBe(true)
  })

  it('redirects a browser to a short-lived link for the full image or the thumbnail, and answers JSON clients with the link', async () => {
    const res = await people.viewer!.client.request('GET', `${base()}/${attachmentId}/file`, undefined)
    expect(res.status).toBe(200)
    expect(res.body.url).toMatch(/X-Amz-Expires=60/)
    const cookie = (people.viewer!.client as unknown as { cookieHeader(): string }).cookieHeader()
    const redirect = await fetch(`${people.viewer!.client.baseUrl}${base()}/${attachmentId}/file?variant=thumbnail`, {
      headers: { accept: 'text/html', cookie }, redirect: 'manual',
    })
    expect(redirect.status).toBe(302)
    const location = redirect.headers.get('location')!
    expect(location).toContain(`orgs/${orgId}/attachments/${attachmentId}/thumbnail.jpg`)
    const bytes = Buffer.from(await (await fetch(location)).arrayBuffer())
    expect((await sharp(bytes).metadata()).format).toBe('jpeg')
  })

  it('answers complete again with the stored image unchanged', async () => {
    const again = await thermo().post(`${base()}/${attachmentId}/complete`)
    expect(again.status).toBe(200)
    expect(again.body.state).toBe('stored')
  })

  it('makes a 320 px thumbnail of a full-size JPEG photo (visible light)', async () => {
    const jpg = await jpegBytes(1200, 900)
    const { complete } = await uploadImage(thermo(), base(), jpg, { kind: 'visible', fileName: 'DSC_0042.JPG', contentType: 'image/jpeg' })
    expect(complete!.status, JSON.stringify(complete!.body)).toBe(200)
    const meta = await sharp(Buffer.from(await (await fetch(complete!.body.thumbnailUrl)).arrayBuffer())).metadata()
    expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 320, 240])
    const list = await thermo().get(base())
    expect(list.body.map((a: { kind: string }) => a.kind)).toEqual(['infrared', 'visible'])
  })

  it('gives lists the thumbnails of several findings at once', async () => {
    const res = await people.viewer!.client.get(`/api/orgs/${slug}/findings/attachments?ids=${findingId},00000000-0000-4000-8000-000000000000`)
    expect(res.status).toBe(200)
    expect(res.body[findingId]).toHaveLength(2)
    expect(res.body['00000000-0000-4000-8000-000000000000']).toEqual([])
    const bad = await people.viewer!.client.get(`/api/orgs/${slug}/findings/attachments?ids=nope`)
    expect(bad.status).toBe(400)
  })

  it('keeps an upload whose bytes have not arrived pending, so the same upload can be retried', async () => {
    const bytes = await pngBytes(32, 32)
    const begin = await thermo().post(base(), { kind: 'infrared', fileName: 'retry.png', contentType: 'image/png', sizeBytes: bytes.length })
    const early = await thermo().post(`${base()}/${begin.body.attachment.id}/complete`)
    expect(early.status).toBe(409)
    expect(early.body.data.message).toMatch(/has not arrived in storage/)
    expect((await rowOf(begin.body.attachment.id)).state).toBe('pending')
    await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(bytes) })
    const late = await thermo().post(`${base()}/${begin.body.attachment.id}/complete`)
    expect(late.status).toBe(200)
    expect(late.body.state).toBe('stored')
  })
})

describe('refusals', () => {
  async function countRows() {
    const r = await testDb().selectFrom('attachments').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    return Number(r.n)
  }

  it('refuses other types and sizes over 25 MB at begin, at their fields, before anything is presigned', async () => {
    const before = await countRows()
    const gif = await thermo().post(base(), { kind: 'infrared', fileName: 'a.gif', contentType: 'image/gif', sizeBytes: 100 })
    expect(gif.status).toBe(400)
    expect(gif.body.data.fieldErrors.contentType[0]).toMatch(/Only JPEG or PNG/)
    const big = await thermo().post(base(), { kind: 'infrared', fileName: 'big.jpg', contentType: 'image/jpeg', sizeBytes: 25 * MB + 1 })
    expect(big.status).toBe(400)
    expect(big.body.data.fieldErrors.sizeBytes[0]).toMatch(/at most 25 MB/)
    expect(big.body.uploadUrl).toBeUndefined()
    const empty = await thermo().post(base(), { kind: 'infrared', fileName: 'empty.jpg', contentType: 'image/jpeg', sizeBytes: 0 })
    expect(empty.status).toBe(400)
    expect(empty.body.data.fieldErrors.sizeBytes[0]).toMatch(/empty/)
    const repair = await thermo().post(base(), { kind: 'repair', fileName: 'r.jpg', contentType: 'image/jpeg', sizeBytes: 10 })
    expect(repair.status).toBe(400)
    expect(repair.body.data.fieldErrors.kind[0]).toMatch(/infrared or visible light/)
    expect(await countRows()).toBe(before)
  })

  it('refuses a text file named .jpg by its content: message, object deleted, row kept as refused', async () => {
    const text = Buffer.from('This is not a picture, just some words typed into a file.\n'.repeat(20))
    const { begin, complete } = await uploadImage(thermo(), base(), text, { fileName: 'photo.jpg', contentType: 'image/jpeg' })
    expect(complete!.status).toBe(400)
    expect(complete!.body.data.message).toMatch(/not a JPEG or PNG image by its content/)
    expect(complete!.body.data.fieldErrors.file[0]).toBe(complete!.body.data.message)
    const row = await rowOf(begin.body.attachment.id)
    expect(row.state).toBe('refused')
    expect(row.refused_reason).toBe(complete!.body.data.message)
    expect(await objectExists(row.object_key)).toBe(false)
    const again = await thermo().post(`${base()}/${row.id}/complete`)
    expect(again.status).toBe(409)
    expect(again.body.data.message).toMatch(/refused/)
    // Refused images are not listed.
    expect((await thermo().get(base())).body.map((a: { id: string }) => a.id)).not.toContain(row.id)
  })

  it('refuses a PNG declared as a JPEG', async () => {
    const { complete } = await uploadImage(thermo(), base(), await pngBytes(), { fileName: 'IR_0002.jpg', contentType: 'image/jpeg' })
    expect(complete!.status).toBe(400)
    expect(complete!.body.data.message).toMatch(/content is PNG but it was declared as JPEG/)
  })

  it('refuses an object bigger than declared', async () => {
    const png = await pngBytes()
    const { begin, complete } = await uploadImage(thermo(), base(), png, { sizeBytes: 100 })
    expect(complete!.status).toBe(400)
    expect(complete!.body.data.message).toMatch(new RegExp(`${png.length} bytes but 100 bytes were declared`))
    expect(await objectExists((await rowOf(begin.body.attachment.id)).object_key)).toBe(false)
  })

  it('refuses an object over 25 MB at complete even when a small size was declared', async () => {
    const huge = new Uint8Array(25 * MB + 10)
    huge.set(await pngBytes(), 0)
    const { begin, complete } = await uploadImage(thermo(), base(), huge, { sizeBytes: 1000 })
    expect(complete!.status).toBe(400)
    expect(complete!.body.data.message).toMatch(/images can be at most 25\.0 MB/)
    expect(await objectExists((await rowOf(begin.body.attachment.id)).object_key)).toBe(false)
  }, 60_000)

  it('refuses an empty object', async () => {
    const begin = await thermo().post(base(), { kind: 'infrared', fileName: 'zero.png', contentType: 'image/png', sizeBytes: 500 })
    await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(0) })
    const complete = await thermo().post(`${base()}/${begin.body.attachment.id}/complete`)
    expect(complete.status).toBe(400)
    expect(complete.body.data.message).toMatch(/empty \(0 bytes\)/)
  })

  it('refuses a truncated image that starts like a PNG but cannot be read', async () => {
    const png = await pngBytes(200, 200)
    const { complete } = await uploadImage(thermo(), base(), png.subarray(0, 60))
    expect(complete!.status).toBe(400)
    expect(complete!.body.data.message).toMatch(/could not be read/)
  })

  it('sanitises names: no path parts, no control characters, limited length; keys never hold the name', async () => {
    const png = await pngBytes(16, 16)
    const cases: Array<[string, string]> = [
      ['../../etc/passwd.jpg', 'passwd.jpg'],
      ['C:\\Users\\theo\\..\\IR_0003.png', 'IR_0003.png'],
      ['sub/dir/IR\u0000_0004.png', 'IR_0004.png'],
      ['line\r\nbreak\u202egnp.png', 'linebreakgnp.png'],
      ['..', 'image'],
      [`${'x'.repeat(300)}.png`, `${'x'.repeat(116)}.png`],
    ]
    for (const [raw, want] of cases) {
      const begin = await thermo().post(base(), { kind: 'visible', fileName: raw, contentType: 'image/png', sizeBytes: png.length })
      expect(begin.status, raw).toBe(201)
      expect(begin.body.attachment.fileName, JSON.stringify(raw)).toBe(want)
      const row = await rowOf(begin.body.attachment.id)
      expect(row.object_key).toBe(`orgs/${orgId}/attachments/${row.id}/original.png`)
    }
  })
})

describe('who may upload and read', () => {
  it('refuses crew and viewers by role, and other thermographers and managers because the survey is not theirs', async () => {
    const png = await pngBytes()
    const body = { kind: 'infrared', fileName: 'x.png', contentType: 'image/png', sizeBytes: png.length }
    for (const key of ['crew', 'viewer']) {
      const res = await people[key]!.client.post(base(), body)
      expect(res.status, key).toBe(403)
      expect(res.body.data.message).toMatch(/does not allow/)
    }
    for (const c of [people.other!.client, owner]) {
      const res = await c.post(base(), body)
      expect(res.status).toBe(403)
      expect(res.body.data.message).toMatch(/Only the thermographer assigned to this survey/)
    }
  })

  it('lets only the person who began an upload complete it', async () => {
    const png = await pngBytes()
    const begin = await thermo().post(base(), { kind: 'infrared', fileName: 'x.png', contentType: 'image/png', sizeBytes: png.length })
    await fetch(begin.body.uploadUrl, { method: 'PUT', headers: begin.body.headers, body: new Uint8Array(png) })
    const other = await people.other!.client.post(`${base()}/${begin.body.attachment.id}/complete`)
    expect(other.status).toBe(403)
    const crew = await people.crew!.client.post(`${base()}/${begin.body.attachment.id}/complete`)
    expect(crew.status).toBe(403)
  })

  it('hides the finding and its images from another organisation (404)', async () => {
    const { client: stranger, slug: strangerSlug } = await signUpOwner('Sam Else', 'sam@elsewhere.test', 'Elsewhere Grid')
    const [first] = (await thermo().get(base())).body
    const paths = [
      ['GET', `/api/orgs/${strangerSlug}/findings/${findingId}/attachments`],
      ['POST', `/api/orgs/${strangerSlug}/findings/${findingId}/attachments`],
      ['POST', `/api/orgs/${strangerSlug}/findings/${findingId}/attachments/${first.id}/complete`],
      ['GET', `/api/orgs/${strangerSlug}/findings/${findingId}/attachments/${first.id}/file`],
      ['GET', `/api/orgs/${slug}/findings/${findingId}/attachments`],
    ] as const
    for (const [method, path] of paths) {
      const res = await stranger.request(method, path, method === 'POST' ? { kind: 'infrared', fileName: 'x.png', contentType: 'image/png', sizeBytes: 10 } : undefined)
      expect([403, 404], `${method} ${path}`).toContain(res.status)
      if (path.includes(strangerSlug)) expect(res.status).toBe(404)
    }
    const batch = await stranger.get(`/api/orgs/${strangerSlug}/findings/attachments?ids=${findingId}`)
    expect(batch.body).toEqual({ [findingId]: [] })
  })

  it('404s an image id under another finding', async () => {
    const [first] = (await thermo().get(base())).body
    const res = await thermo().get(`/api/orgs/${slug}/findings/00000000-0000-4000-8000-000000000000/attachments/${first.id}/file`)
    expect(res.status).toBe(404)
  })

  it('takes a wrong image off the finding by archiving it (assigned thermographer only); the record stays', async () => {
    const { complete } = await uploadImage(thermo(), base(), await pngBytes(), { fileName: 'wrong-one.png' })
    const id = complete!.body.id
    const viewer = await people.viewer!.client.post(`${base()}/${id}/archive`)
    expect(viewer.status).toBe(403)
    const other = await people.other!.client.post(`${base()}/${id}/archive`)
    expect(other.status).toBe(403)
    const res = await thermo().post(`${base()}/${id}/archive`)
    expect(res.status).toBe(204)
    expect((await thermo().get(base())).body.map((a: { id: string }) => a.id)).not.toContain(id)
    expect((await thermo().get(`${base()}/${id}/file`)).status).toBe(404)
    const batch = await thermo().get(`/api/orgs/${slug}/findings/attachments?ids=${findingId}`)
    expect(batch.body[findingId].map((a: { id: string }) => a.id)).not.toContain(id)
    const row = await rowOf(id)
    expect(row.archived_at).not.toBeNull()
    expect(await objectExists(row.object_key)).toBe(true)
    expect((await thermo().post(`${base()}/${id}/archive`)).status).toBe(404)
  })

  it('stops uploads once the survey is submitted, while the images stay readable', async () => {
    const survey = await thermo().get(`/api/orgs/${slug}/surveys/${surveyId}`)
    const submit = await thermo().post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: survey.body.version })
    expect(submit.status, JSON.stringify(submit.body)).toBe(200)
    const png = await pngBytes()
    const res = await thermo().post(base(), { kind: 'infrared', fileName: 'late.png', contentType: 'image/png', sizeBytes: png.length })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/only be added while the survey is in progress or returned/)
    expect((await owner.get(base())).body.length).toBeGreaterThanOrEqual(3)
  })
})
