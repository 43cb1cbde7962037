import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase } from '../support/db'
import { createAsset, createSite, uploadCsv } from '../support/register'
import { parseCsv } from '../../shared/csv'

let source: { client: ApiClient; slug: string }
let target: { client: ApiClient; slug: string }

async function download(client: ApiClient, url: string) {
  const res = await client.get(url)
  expect(res.status).toBe(200)
  expect(res.headers.get('content-type')).toMatch(/^text\/csv/)
  expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename=".+\.csv"$/)
  return res.body as string
}

beforeAll(async () => {
  await resetDatabase()
  source = await signUpOwner('Fay Gill', 'fay@export.test', 'Source Grid')
  target = await signUpOwner('Gus Hale', 'gus@export.test', 'Target Grid')
  const { client, slug } = source
  const a = await createSite(client, slug, {
    code: 'EX-1', name: 'Ærøskøbing, "Old" Yard', kind: 'plant_room', latitude: 54.888, longitude: 10.4, voltageKv: 0.4,
    accessNotes: 'Line one\nLine two', safetyNotes: '=not a formula', safetyFlags: ['ir_windows', 'confined_space'],
  })
  const b = await createSite(client, slug, { code: 'EX-2', name: 'Second', kind: 'line_section', latitude: -33.9, longitude: 151.2, voltageKv: null })
  const gone = await createSite(client, slug, { code: 'EX-0', name: 'Closed' })
  await client.post(`/api/orgs/${slug}/sites/${gone.id}/archive`, { version: gone.version })
  await createAsset(client, slug, a.id, { label: '+T1', assetClass: 'transformer', manufacturer: 'Hallam, Ltd', model: 'HX "40"', voltageKv: 11, ratedCurrentA: 1250.5, criticality: 5, condition: 3, components: ['H1', 'X1', 'N'], intervalMonths: 6 })
  await createAsset(client, slug, a.id, { label: 'CB-2', assetClass: 'breaker' })
  const old = await createAsset(client, slug, b.id, { label: 'Old arrester', assetClass: 'surge_arrester' })
  await client.post(`/api/orgs/${slug}/assets/${old.id}/archive`, { version: old.version })
  await createAsset(client, slug, b.id, { label: 'LC1', assetClass: 'line_connector', components: ['A'] })
})

describe('export', () => {
  it('writes the import columns, quoting what needs it and defusing formula-like text', async () => {
    const sites = await download(source.client, `/api/orgs/${source.slug}/sites/export`)
    const { records, errors } = parseCsv(sites)
    expect(errors).toEqual([])
    expect(records[0]).toEqual(['code', 'name', 'kind', 'latitude', 'longitude', 'voltage_kv', 'access_notes', 'safety_notes', 'safety_flags'])
    // Archived sites are left out unless asked for.
    expect(records.slice(1).map((r) => r[0])).toEqual(['EX-1', 'EX-2'])
    expect(records[1]).toEqual(['EX-1', 'Ærøskøbing, "Old" Yard', 'plant_room', '54.888', '10.4', '0.4', 'Line one\nLine two', "'=not a formula", 'ir_windows;confined_space'])
    // RFC 4180 §2: CRLF line ends, fields with quotes are quoted and their quotes doubled.
    expect(sites).toContain('"Ærøskøbing, ""Old"" Yard"')
    expect(sites.endsWith('\r\n')).toBe(true)
    const all = parseCsv(await download(source.client, `/api/orgs/${source.slug}/sites/export?show=all`)).records
    expect(all.slice(1).map((r) => r[0])).toEqual(['EX-0', 'EX-1', 'EX-2'])

    const assets = parseCsv(await download(source.client, `/api/orgs/${source.slug}/assets/export`)).records
    expect(assets.slice(1)).toEqual([
      ['EX-1', "'+T1", 'transformer', 'Hallam, Ltd', 'HX "40"', '11', '1250.5', '5', '3', 'H1;X1;N', '6'],
      ['EX-1', 'CB-2', 'breaker', '', '', '', '', '3', '1', 'A;B;C', ''],
      ['EX-2', 'LC1', 'line_connector', '', '', '', '', '3', '1', 'A', ''],
    ])
  })

  it('round-trips: an exported register imports into another organisation and exports identically', async () => {
    const sites = await download(source.client, `/api/orgs/${source.slug}/sites/export`)
    const assets = await download(source.client, `/api/orgs/${source.slug}/assets/export`)
    for (const [kind, text] of [['sites', sites], ['assets', assets]] as const) {
      const check = await uploadCsv(target.client, target.slug, kind, text, 80)
      expect(check.body, JSON.stringify(check.body.problems)).toMatchObject({ ready: true, badRowCount: 0 })
      const commit = await target.client.post(`/api/orgs/${target.slug}/register-imports/${check.body.id}/commit`)
      expect(commit.status).toBe(200)
    }
    expect(await download(target.client, `/api/orgs/${target.slug}/sites/export`)).toBe(sites)
    expect(await download(target.client, `/api/orgs/${target.slug}/assets/export`)).toBe(assets)
    const t1 = (await target.client.get(`/api/orgs/${target.slug}/assets?q=T1`)).body.items[0]
    expect(t1).toMatchObject({ label: '+T1', manufacturer: 'Hallam, Ltd', model: 'HX "40"', ratedCurrentA: 1250.5, components: ['H1', 'X1', 'N'] })
  })
})
