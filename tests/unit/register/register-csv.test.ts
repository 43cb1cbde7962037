import { describe, expect, it } from 'vitest'
import { ASSET_CSV_COLUMNS, SITE_CSV_COLUMNS, mapHeader, readAssetRow, readSiteRow, rowKeys } from '../../../shared/register-csv'

const siteHeader = mapHeader('sites', ['Code', 'Name', 'Kind', 'Latitude', 'Longitude', 'Voltage (kV)', 'Colour'])

describe('mapHeader', () => {
  it('matches column names loosely and lists unknown ones', () => {
    expect(siteHeader.positions).toEqual({ code: 0, name: 1, kind: 2, latitude: 3, longitude: 4, voltage_kv: 5 })
    expect(siteHeader.ignored).toEqual(['Colour'])
    expect(siteHeader.problems).toEqual([])
  })

  it('names each missing required column and each repeated one', () => {
    const h = mapHeader('assets', ['label', 'label', 'class'])
    expect(h.problems.map((p) => p.field)).toEqual(['label', 'site_code'])
    expect(h.positions.asset_class).toBe(2)
  })

  it('publishes a required flag, a description and an example for every column', () => {
    for (const c of [...SITE_CSV_COLUMNS, ...ASSET_CSV_COLUMNS]) {
      expect(c.description.length).toBeGreaterThan(5)
      expect(c.example).not.toBe('')
    }
    expect(SITE_CSV_COLUMNS.filter((c) => c.required).map((c) => c.name)).toEqual(['code', 'name', 'kind', 'latitude', 'longitude'])
    expect(ASSET_CSV_COLUMNS.filter((c) => c.required).map((c) => c.name)).toEqual(['site_code', 'label', 'asset_class'])
  })
})

describe('readSiteRow', () => {
  it('reads numbers, labels of choices and trims text', () => {
    const r = readSiteRow([' LMV-7 ', 'Tarn End', 'Plant room', '54.5', '-2.75', '0.4'], siteHeader)
    expect(r).toEqual({
      problems: [],
      data: { code: 'LMV-7', name: 'Tarn End', kind: 'plant_room', latitude: 54.5, longitude: -2.75, voltageKv: 0.4, accessNotes: '', safetyNotes: '', safetyFlags: [] },
    })
  })

  it('explains each bad field in column order', () => {
    const r = readSiteRow(['has space', '', 'farm', '91', '1,5', ''], siteHeader)
    expect(r.data).toBeNull()
    expect(r.problems.map((p) => p.field)).toEqual(['code', 'name', 'kind', 'latitude', 'longitude'])
    expect(r.problems.find((p) => p.field === 'longitude')!.message).toBe('"1,5" is not a number. Write digits only, like -2.9081. Use a point as the decimal separator.')
    expect(r.problems.find((p) => p.field === 'latitude')!.message).toBe('Latitude runs from -90 to 90 degrees.')
  })
})

describe('readAssetRow', () => {
  const h = mapHeader('assets', ['site_code', 'label', 'asset_class', 'criticality', 'condition', 'components', 'interval_months', 'rated_current_a'])

  it('applies the documented defaults to blank cells', () => {
    expect(readAssetRow(['S1', 'T1', 'transformer', '', '', '', '', ''], h).data).toEqual({
      siteCode: 'S1', label: 'T1', assetClass: 'transformer', manufacturer: '', model: '', voltageKv: null, ratedCurrentA: null,
      criticality: 3, condition: 1, components: ['A', 'B', 'C'], intervalMonths: null,
    })
  })

  it('splits components on semicolons and refuses repeats', () => {
    expect(readAssetRow(['S1', 'T1', 'bus', '', '', 'A; B ;C;N', '', ''], h).data!.components).toEqual(['A', 'B', 'C', 'N'])
    expect(readAssetRow(['S1', 'T1', 'bus', '', '', 'A;a', '', ''], h).problems).toEqual([{ field: 'components', message: 'Name each component once.' }])
  })

  it('refuses fractions where whole numbers are needed and keeps the keys of a bad row', () => {
    const record = ['S1', 'T1', 'Surge arrester', '2.5', '', '', '1.5', '-3']
    const r = readAssetRow(record, h)
    expect(r.problems.map((p) => p.field)).toEqual(['rated_current_a', 'criticality', 'interval_months'])
    expect(rowKeys('assets', record, h)).toEqual({ code: 'S1', label: 'T1' })
  })
})

describe('the published columns', () => {
  it('README lists every import column with whether it is required, as the code reads them', async () => {
    const { readFileSync } = await import('node:fs')
    const readme = readFileSync(new URL('../../../README.md', import.meta.url), 'utf8')
    const start = readme.indexOf('## Asset register')
    const section = readme.slice(start, readme.indexOf('\n## ', start + 5))
    expect(start).toBeGreaterThan(-1)
    for (const [kind, columns] of [['sites', SITE_CSV_COLUMNS], ['assets', ASSET_CSV_COLUMNS]] as const) {
      const table = section.slice(section.indexOf(`Columns of ${kind === 'sites' ? 'a' : 'an'} **${kind}** file`))
      const rows = [...table.matchAll(/^\| `([a-z_]+)` \| (required|optional) \|/gm)].slice(0, columns.length)
      expect(rows.map((m) => [m[1], m[2]]), kind).toEqual(columns.map((c) => [c.name, c.required ? 'required' : 'optional']))
    }
  })
})
