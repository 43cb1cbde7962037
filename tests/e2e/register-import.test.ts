import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { allProblems, createAsset, createSite, uploadCsv } from '../support/register'

let owner: ApiClient
let slug: string
let orgId: string

const count = async (table: 'sites' | 'assets') =>
  Number((await testDb().selectFrom(table).select((eb) => eb.fn.countAll().as('n')).where('organisation_id', '=', orgId).executeTakeFirstOrThrow()).n)

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Eli Moss', 'eli@import.test', 'Moorgate Networks'))
  orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
})

const SITES_HEADER = 'code,name,kind,latitude,longitude,voltage_kv,access_notes,safety_notes,safety_flags\r\n'

describe('importing sites', () => {
  it('previews every bad row with its field and a plain message, and commits nothing while any remains', async () => {
    await createSite(owner, slug, { code: 'MG-EXIST', name: 'Already here' })
    const text = SITES_HEADER + [
      'MG-01,Moorgate North,substation,54.1,-2.1,132,"Gate 2, key safe","Call ""control"" first",permit_required',
      'MG-02,Moorgate South,farm,54.2,-2.2,33,,,',
      'MG-03,Ridge,switchyard,,-2.3,,,,',
      'MG-04,Dale,plant room,54.4,-2.4,11kV,,,',
      'MG-01,Copy of north,substation,54.5,-2.5,,,,',
      'MG-EXIST,Clash,line section,54.6,-2.6,,,,',
      'MG-07,Fell,substation,54.7,-2.7,,,,bring a torch',
      '',
      'MG-09,Tarn,Line section,54.9,-2.9,0.4,,,IR windows fitted;work_in_pairs',
    ].join('\r\n') + '\r\n'
    const before = await count('sites')
    const check = await uploadCsv(owner, slug, 'sites', text, 120)
    expect(check.status, JSON.stringify(check.body)).toBe(200)
    expect(check.body).toMatchObject({ status: 'checked', rowCount: 8, badRowCount: 6, ready: false })
    const problems = await allProblems(owner, slug, check.body.id)
    // Rows are numbered as a spreadsheet shows them: the header is row 1; the blank line 9 is skipped but counted.
    expect(problems).toEqual([
      { row: 3, field: 'kind', message: 'Unknown kind "farm". Use one of: substation, switchyard, plant_room, line_section.' },
      { row: 4, field: 'latitude', message: 'Enter the latitude in decimal degrees, like 51.5074.' },
      { row: 5, field: 'voltage_kv', message: '"11kV" is not a number. Write digits only, like 132.' },
      { row: 6, field: 'code', message: 'The code MG-01 is also on row 2 of this file. Each site needs its own code.' },
      { row: 7, field: 'code', message: 'The code MG-EXIST is already in the register (Already here). Use another code, or leave this row out.' },
      { row: 8, field: 'safety_flags', message: expect.stringMatching(/^Unknown safety flag "bring a torch"\. Use: permit_required/) },
    ])
    const commit = await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)
    expect(commit.status).toBe(422)
    expect(commit.body.data.message).toBe('Nothing was imported: 6 rows have problems. Fix the file and upload it again.')
    expect(await count('sites')).toBe(before)
  })

  it('commits a clean file in one go, with every value as written', async () => {
    const text = SITES_HEADER + [
      'MG-11,Moorgate North,substation,54.1,-2.1,132,"Gate 2, key safe","Call ""control"" first",permit_required',
      'MG-12,Moorgate South,Switchyard,54.2,-2.2,33,,,',
      'MG-19,Tarn,Line section,54.9,-2.9,0.4,,,IR windows fitted;work_in_pairs',
    ].join('\n')
    const before = await count('sites')
    const check = await uploadCsv(owner, slug, 'sites', text)
    expect(check.body).toMatchObject({ rowCount: 3, badRowCount: 0, ready: true, problems: [] })
    const commit = await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)
    expect(commit.status, JSON.stringify(commit.body)).toBe(200)
    expect(commit.body).toMatchObject({ status: 'committed', insertedCount: 3 })
    expect(await count('sites')).toBe(before + 3)
    const north = (await owner.get(`/api/orgs/${slug}/sites?q=MG-11`)).body.items[0]
    expect(north).toMatchObject({ name: 'Moorgate North', kind: 'substation', latitude: 54.1, longitude: -2.1, voltageKv: 132, accessNotes: 'Gate 2, key safe', safetyNotes: 'Call "control" first', safetyFlags: ['permit_required'] })
    const tarn = (await owner.get(`/api/orgs/${slug}/sites?q=MG-19`)).body.items[0]
    expect(tarn).toMatchObject({ kind: 'line_section', voltageKv: 0.4, safetyFlags: ['ir_windows', 'work_in_pairs'] })
    // A committed import cannot be committed twice.
    expect((await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)).status).toBe(409)
  })

  it('reports a missing required column for the whole file', async () => {
    const check = await uploadCsv(owner, slug, 'sites', 'code,name,kind,latitude\nX-1,Ex,substation,50\n')
    expect(check.body.fileProblems).toEqual([{ row: 0, field: 'longitude', message: 'The header has no "longitude" column. Add it (see the expected columns).' }])
    expect(check.body.ready).toBe(false)
  })
})

describe('importing assets', () => {
  const HEADER = 'site_code,label,asset_class,manufacturer,model,voltage_kv,rated_current_a,criticality,condition,components,interval_months\n'

  it('names unknown classes, unknown or archived sites, duplicates and bad numbers', async () => {
    const site = await createSite(owner, slug, { code: 'AS-1', name: 'Asset Site' })
    const closed = await createSite(owner, slug, { code: 'AS-OLD', name: 'Closed Site' })
    await owner.post(`/api/orgs/${slug}/sites/${closed.id}/archive`, { version: closed.version })
    await createAsset(owner, slug, site.id, { label: 'T1' })
    const text = HEADER + [
      'AS-1,T2,transformer,Hallam,HX,33,800,4,1,A;B;C,',
      'AS-1,CB1,xfmr,,,,,,,,',
      'AS-9,CB2,breaker,,,,,,,,',
      'AS-1,T2,transformer,,,,,,,,',
      'AS-1,T1,transformer,,,,,,,,',
      'AS-1,CB3,breaker,,,,"1,250",6,4,,0',
      'AS-OLD,CB4,breaker,,,,,,,,',
      ',CB5,breaker,,,,,,,,',
    ].join('\n') + '\n'
    const check = await uploadCsv(owner, slug, 'assets', text, 100)
    expect(check.body).toMatchObject({ rowCount: 8, badRowCount: 7, ready: false })
    const problems = await allProblems(owner, slug, check.body.id)
    expect(problems).toEqual([
      { row: 3, field: 'asset_class', message: expect.stringMatching(/^Unknown class "xfmr"\. Use one of: transformer, breaker/) },
      { row: 4, field: 'site_code', message: 'No site with the code AS-9 is in the register. Add the site (or import the sites file) first.' },
      { row: 5, field: 'label', message: 'The label T2 at site AS-1 is also on row 2 of this file. Labels are unique within a site.' },
      { row: 6, field: 'label', message: 'Site AS-1 already has an asset labelled T1 in the register.' },
      { row: 7, field: 'rated_current_a', message: '"1,250" is not a number. Write digits only, like 800. Use a point as the decimal separator.' },
      { row: 7, field: 'criticality', message: 'Use 1 (low) to 5 (highest).' },
      { row: 7, field: 'condition', message: 'Use 1 (good), 2 (fair) or 3 (poor).' },
      { row: 7, field: 'interval_months', message: 'Use 1 to 60 months.' },
      { row: 8, field: 'site_code', message: 'The site AS-OLD is archived. Restore it before adding assets to it.' },
      { row: 9, field: 'site_code', message: 'Enter the code of the site this asset is at.' },
    ])
  })

  it('commits all rows or none: a clash added after the check stops the whole file', async () => {
    const site = await createSite(owner, slug, { code: 'AON', name: 'All or none' })
    const rows = Array.from({ length: 40 }, (_, i) => `AON,P${i},panelboard,,,0.4,250,2,2,A;B;C;N,12`)
    const check = await uploadCsv(owner, slug, 'assets', HEADER + rows.join('\n'), 300)
    expect(check.body).toMatchObject({ rowCount: 40, badRowCount: 0, ready: true })
    // Someone adds P33 by hand between the preview and the commit.
    await createAsset(owner, slug, site.id, { label: 'P33', assetClass: 'panelboard' })
    const before = await count('assets')
    const commit = await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)
    expect(commit.status).toBe(422)
    expect(commit.body.data.summary.problems).toEqual([{ row: 35, field: 'label', message: 'Site AON already has an asset labelled P33 in the register.' }])
    expect(await count('assets')).toBe(before)

    // The fixed file goes in whole.
    const fixed = await uploadCsv(owner, slug, 'assets', HEADER + rows.filter((r) => !r.startsWith('AON,P33,')).join('\n'))
    const done = await owner.post(`/api/orgs/${slug}/register-imports/${fixed.body.id}/commit`)
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    expect(done.body.insertedCount).toBe(39)
    expect(await count('assets')).toBe(before + 39)
    const p7 = (await owner.get(`/api/orgs/${slug}/assets?q=P7&site=${site.id}`)).body.items[0]
    expect(p7).toMatchObject({ label: 'P7', assetClass: 'panelboard', voltageKv: 0.4, ratedCurrentA: 250, criticality: 2, condition: 2, components: ['A', 'B', 'C', 'N'], intervalMonths: 12 })
  })

  it('takes pieces in order only, a retried piece once, and refuses to check an incomplete upload', async () => {
    await createSite(owner, slug, { code: 'SEQ' })
    const text = HEADER + 'SEQ,A1,bus,,,,,,,,\nSEQ,A2,bus,,,,,,,,\n'
    const [first, second] = [text.slice(0, HEADER.length + 19), text.slice(HEADER.length + 19)]
    const created = await owner.post(`/api/orgs/${slug}/register-imports`, { kind: 'assets', fileName: 'seq.csv', totalChars: text.length })
    const url = `/api/orgs/${slug}/register-imports/${created.body.id}`
    expect((await owner.post(`${url}/chunks`, { seq: 1, text: second })).status).toBe(409)
    expect((await owner.post(`${url}/chunks`, { seq: 0, text: first })).body.rowCount).toBe(1)
    expect((await owner.post(`${url}/chunks`, { seq: 0, text: first })).body.rowCount).toBe(1)
    const early = await owner.post(`${url}/check`)
    expect(early.status).toBe(409)
    expect(early.body.data.message).toMatch(/The upload is not complete/)
    expect((await owner.post(`${url}/chunks`, { seq: 1, text: second })).body).toMatchObject({ rowCount: 2, receivedChars: text.length })
    expect((await owner.post(`${url}/check`)).body).toMatchObject({ ready: true, rowCount: 2 })
    expect((await owner.post(`${url}/chunks`, { seq: 2, text: 'SEQ,A3,bus\n' })).status).toBe(409)
  })

  it('takes a 5 000-row file in pieces and commits it in one transaction', async () => {
    const site = await createSite(owner, slug, { code: 'BIG' })
    const rows = Array.from({ length: 5000 }, (_, i) => `BIG,L${String(i).padStart(5, '0')},line_connector,Pennine,"PC-${i % 9}, heavy",11,400,${(i % 5) + 1},${(i % 3) + 1},A;B;C,`)
    const started = Date.now()
    const check = await uploadCsv(owner, slug, 'assets', HEADER + rows.join('\r\n'), 64 * 1024)
    expect(check.body).toMatchObject({ rowCount: 5000, badRowCount: 0, ready: true })
    expect(check.body.chunksReceived).toBeGreaterThan(3)
    const commit = await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)
    expect(commit.body.insertedCount).toBe(5000)
    const list = await owner.get(`/api/orgs/${slug}/assets?site=${site.id}&pageSize=25`)
    expect(list.body.total).toBe(5000)
    expect(list.body.items[0]).toMatchObject({ label: 'L00000', model: 'PC-0, heavy' })
    console.log(`5 000-row import: ${Date.now() - started} ms from first piece to commit`)
  })
})
