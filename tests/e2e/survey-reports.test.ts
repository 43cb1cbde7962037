import { PDFParse } from 'pdf-parse'
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner, joinByInvitation } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { jpegBytes, uploadImage } from '../support/images'
import { reviewedSurvey, waitForReport } from '../support/reports'
import { SAFETY_CAUTION } from '../../shared/thermal/safety'
import { REPORT_DISCLAIMER } from '../../shared/report'

// Survey reports: made in the background from a reviewed survey, stored in object storage, checked by parsing the PDF.

let owner: ApiClient
let slug: string
let orgId: string
let instrumentId: string
const sites: Record<string, string> = {}
const assets: Record<string, string> = {}
const people: Record<string, { client: ApiClient; id: string }> = {}
let surveyId: string
const findings: Array<{ id: string; asset: string; component: string; phase: string; riseOverReferenceK: number | null; riseOverAmbientK: number | null; band: number | null }> = []

async function join(key: string, role: string) {
  const email = `${key}@reports.test`
  people[key] = await joinByInvitation(owner, slug, email, role, `Report ${key}`, 'report password')
}

async function pdfText(pdf: Uint8Array): Promise<string> {
  // A copy: pdf.js hands its input to a worker, which leaves the caller's buffer empty.
  const parser = new PDFParse({ data: pdf.slice() })
  try {
    return (await parser.getText()).text.replace(/\s+/g, ' ')
  } finally {
    await parser.destroy()
  }
}

// Image XObjects in the file: pdfkit writes object dictionaries uncompressed, one per embedded image.
const imageObjects = (pdf: Uint8Array) => (Buffer.from(pdf).toString('latin1').match(/\/Subtype \/Image/g) ?? []).length

async function download(client: ApiClient, reportId: string): Promise<{ bytes: Uint8Array; fileName: string }> {
  const link = await client.get(`/api/orgs/${slug}/reports/${reportId}/download`)
  expect(link.status, JSON.stringify(link.body)).toBe(200)
  const res = await fetch(link.body.url)
  expect(res.status).toBe(200)
  return { bytes: new Uint8Array(await res.arrayBuffer()), fileName: link.body.fileName }
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Rhona Reports', 'rhona@reports.test', 'Lowmoor Valley Power'))
  orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
  for (const [key, role] of [['manager', 'manager'], ['thermo', 'thermographer'], ['crew', 'crew'], ['viewer', 'viewer']] as const) await join(key, role)
  for (const [code, name] of [['LM-01', 'Lowmoor Grid'], ['LM-02', 'Harrow Switchyard']] as const) {
    sites[code] = (await owner.post(`/api/orgs/${slug}/sites`, { code, name, kind: 'substation', latitude: 54.1, longitude: -2.9 })).body.id
  }
  for (const [label, site, cls] of [['T1', 'LM-01', 'transformer'], ['CB1', 'LM-01', 'breaker'], ['DS1', 'LM-01', 'disconnect'], ['T2', 'LM-02', 'transformer'], ['CB2', 'LM-02', 'breaker']] as const) {
    assets[label] = (await owner.post(`/api/orgs/${slug}/assets`, { siteId: sites[site], label, assetClass: cls })).body.id
  }
  instrumentId = (await owner.post(`/api/orgs/${slug}/instruments`, {
    make: 'Halden', model: 'T8', serial: 'H-0815', bandFromUm: 7.5, bandToUm: 14, accuracyK: 2, accuracyPct: 2, ifovMrad: 1.3, calibrationDue: '2027-03-31',
  })).body.id
  const q = await owner.post(`/api/orgs/${slug}/members/${people.thermo!.id}/qualification`, { qualification: 'ISO 18436-7 category II, cert. LV-2231' })
  expect(q.status, JSON.stringify(q.body)).toBe(200)

  const thermo = people.thermo!.client
  const image = await jpegBytes(640, 480)
  surveyId = await reviewedSurvey(owner, thermo, slug, { thermographerId: people.thermo!.id, instrumentId, siteIds: [sites['LM-01']!, sites['LM-02']!] }, async (id) => {
    const base = `/api/orgs/${slug}/surveys/${id}`
    await thermo.post(`${base}/conditions`, { siteId: sites['LM-01'], ambientC: 12, windMs: 2, humidityPct: 70, sky: 'overcast', loadNotes: 'Evening peak' })
    const readings = [
      { asset: 'T1', component: 'Line-side connector', phase: 'A', apparentC: 78, referenceC: 31 },
      { asset: 'CB1', component: 'Load-side clamp', phase: 'C', apparentC: 44, referenceC: 30 },
    ]
    for (const r of readings) {
      const res = await thermo.post(`${base}/findings`, {
        assetId: assets[r.asset], component: r.component, phase: r.phase, apparentC: r.apparentC, referenceC: r.referenceC, ambientC: 12,
        emissivity: 0.9, reflectedC: 15, reflectedMethod: 'reflector', distanceM: 4, loadA: 400, ratedA: 630, windMs: 2, probableCause: 'loose_connection',
      })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      findings.push({ id: res.body.id, asset: r.asset, component: r.component, phase: r.phase, riseOverReferenceK: res.body.riseOverReferenceK, riseOverAmbientK: res.body.riseOverAmbientK, band: res.body.band })
      for (const kind of ['infrared', 'visible']) {
        const up = await uploadImage(thermo, `/api/orgs/${slug}/findings/${res.body.id}/attachments`, image, { kind, fileName: `${r.asset}-${kind}.jpg`, contentType: 'image/jpeg' })
        expect(up.complete?.status, JSON.stringify(up.complete?.body ?? up.begin.body)).toBe(200)
      }
    }
    await thermo.post(`${base}/checks`, { assetId: assets.T2, outcome: 'not_reached', reason: 'no_access', note: 'Gate locked by the landowner' })
  })
}, 120_000)

describe('survey reports', () => {
  let reportId: string
  let pdf: Uint8Array
  let text: string

  it('refuses a survey that is not reviewed, with a plain message', async () => {
    const thermo = people.thermo!.client
    const planned = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-03', thermographerId: people.thermo!.id, instrumentId, siteIds: [sites['LM-02']] })
    await thermo.post(`/api/orgs/${slug}/surveys/${planned.body.id}/start`, { version: planned.body.version })
    const res = await owner.post(`/api/orgs/${slug}/surveys/${planned.body.id}/reports`, {})
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/Only a reviewed survey can be reported on/)
    const count = await testDb().selectFrom('survey_reports').select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
    expect(Number(count.n)).toBe(0)
  })

  it('lets managers and owners make reports, not crews, viewers or thermographers', async () => {
    for (const key of ['crew', 'viewer', 'thermo']) {
      const res = await people[key]!.client.post(`/api/orgs/${slug}/surveys/${surveyId}/reports`, {})
      expect(res.status, key).toBe(403)
    }
    const res = await people.manager!.client.post(`/api/orgs/${slug}/surveys/${surveyId}/reports`, { includeImages: true })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(['queued', 'running']).toContain(res.body.state)
    expect(res.body.downloadPath).toBeNull()
    reportId = res.body.id
  })

  it('is made in the background, with progress, and stored under the organisation’s prefix', async () => {
    const { report, seen } = await waitForReport(people.manager!.client, slug, reportId)
    expect(report.state, report.error).toBe('ready')
    expect(report.progress).toBe(100)
    expect(seen.every((s, i) => i === 0 || s.progress >= seen[i - 1]!.progress)).toBe(true)
    expect(report.findingCount).toBe(2)
    expect(report.imageCount).toBe(4)
    expect(report.pageCount).toBeGreaterThanOrEqual(6)
    expect(report.downloadPath).toBe(`/api/orgs/${slug}/reports/${reportId}/download`)
    const row = await testDb().selectFrom('survey_reports').select(['object_key', 'size_bytes']).where('id', '=', reportId).executeTakeFirstOrThrow()
    expect(row.object_key).toMatch(new RegExp(`^orgs/${orgId}/reports/${surveyId}/`))
    const list = await people.viewer!.client.get(`/api/orgs/${slug}/surveys/${surveyId}/reports`)
    expect(list.body.map((r: { id: string }) => r.id)).toEqual([reportId])
    pdf = (await download(people.viewer!.client, reportId)).bytes
    expect(Buffer.from(pdf.slice(0, 5)).toString()).toBe('%PDF-')
    expect(pdf.length).toBe(Number(row.size_bytes))
  })

  it('sends a browser to object storage, and a JSON client the link', async () => {
    const res = await people.viewer!.client.request('GET', `/api/orgs/${slug}/reports/${reportId}/download`, undefined, false, { accept: 'text/html' })
    expect(res.status).toBe(302)
    expect(res.headers.get('location')).toMatch(/X-Amz-Signature=/)
    expect(decodeURIComponent(res.headers.get('location')!)).toContain('attachment; filename="greybody-')
  })

  it('prints every finding with its rises and band, and embeds the infrared and visible images', async () => {
    text = await pdfText(pdf)
    for (const f of findings) {
      expect(text).toContain(`${f.asset} · ${f.component} (${f.phase})`)
      // Rises as the API computed and stored them, in K (the requester's unit is °C).
      expect(text).toContain(`${f.riseOverReferenceK!.toFixed(1)} K`)
      expect(text).toContain(`${f.riseOverAmbientK!.toFixed(1)} K`)
      expect(text).toContain(f.band === null ? 'Below the bands' : `Band ${f.band}`)
      expect(text).toContain(`${f.asset}-infrared.jpg`)
      expect(text).toContain(`${f.asset}-visible.jpg`)
    }
    expect(text).toContain('Correction chain')
    expect(text).toContain('None raised yet') // no work order for these findings yet
    expect(imageObjects(pdf)).toBe(4)
  })

  it('prints the cover, the inventory with reasons, the caution and the disclaimer', async () => {
    expect(text).toContain('Lowmoor Valley Power')
    expect(text).toContain('Report thermo')
    expect(text).toContain('ISO 18436-7 category II, cert. LV-2231')
    expect(text).toContain('Halden T8, serial H-0815')
    expect(text).toContain('2027-03-31')
    expect(text).toContain('Evening peak')
    for (const label of Object.keys(assets)) expect(text).toMatch(new RegExp(`\\b${label}\\b`))
    expect(text).toContain('Not reached: No access')
    expect(text).toContain('Gate locked by the landowner')
    expect(text).toContain('LM-02 Harrow Switchyard')
    expect(text).toContain(SAFETY_CAUTION[0]!.slice(0, 80))
    expect(text).toContain(REPORT_DISCLAIMER.slice(0, 80))
  })

  it('makes a copy without images, smaller, with a note where they were', async () => {
    const res = await owner.post(`/api/orgs/${slug}/surveys/${surveyId}/reports`, { includeImages: false })
    const { report } = await waitForReport(owner, slug, res.body.id)
    expect(report.state).toBe('ready')
    expect(report.imageCount).toBe(0)
    const small = (await download(owner, res.body.id)).bytes
    expect(imageObjects(small)).toBe(0)
    expect(small.length).toBeLessThan(pdf.length)
    expect(await pdfText(small)).toContain('Images left out of this copy')
  })

  it('keeps reports to their organisation and to the roles that read them', async () => {
    expect((await people.crew!.client.get(`/api/orgs/${slug}/reports/${reportId}`)).status).toBe(403)
    expect((await people.crew!.client.get(`/api/orgs/${slug}/reports/${reportId}/download`)).status).toBe(403)
    const { client: stranger, slug: otherSlug } = await signUpOwner('Ola Other', 'ola@reports.test', 'Other Utility')
    expect((await stranger.get(`/api/orgs/${otherSlug}/reports/${reportId}`)).status).toBe(404)
    expect((await stranger.get(`/api/orgs/${otherSlug}/reports/${reportId}/download`)).status).toBe(404)
    expect((await stranger.get(`/api/orgs/${slug}/reports/${reportId}`)).status).toBe(404)
    expect((await stranger.post(`/api/orgs/${otherSlug}/surveys/${surveyId}/reports`, {})).status).toBe(404)
  })

  it('answers 409 for the file of a report that is not ready', async () => {
    // A report that failed (inserted behind the app's back, in its own organisation) has no file to give.
    const row = await testDb().insertInto('survey_reports').values({
      organisation_id: orgId, survey_id: surveyId, requested_by: people.manager!.id, state: 'failed', error: 'test',
      object_key: null, size_bytes: null, page_count: null, finding_count: null, image_count: null, started_at: null, heartbeat_at: null, finished_at: null,
    }).returning('id').executeTakeFirstOrThrow()
    const res = await owner.get(`/api/orgs/${slug}/reports/${row.id}/download`)
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/not ready/)
  })
})
