import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { createAsset, createSite } from '../support/register'
import { ASSET_CLASSES } from '../../shared/register'

let owner: ApiClient
let slug: string

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Bo Ek', 'bo@assets.test', 'Eastmere Energy'))
})

describe('assets', () => {
  it('creates an asset with the documented defaults, edits it and archives it', async () => {
    const site = await createSite(owner, slug, { code: 'EM-1', name: 'Eastmere Primary' })
    const res = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.id, label: ' Bay 3 breaker ', assetClass: 'breaker' })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body).toMatchObject({
      site: { id: site.id, code: 'EM-1', name: 'Eastmere Primary', archived: false },
      label: 'Bay 3 breaker', assetClass: 'breaker', manufacturer: '', model: '', voltageKv: null, ratedCurrentA: null,
      criticality: 3, condition: 1, components: ['A', 'B', 'C'], intervalMonths: null, archivedAt: null, version: 1,
    })
    const id = res.body.id
    const edited = await owner.patch(`/api/orgs/${slug}/assets/${id}`, {
      manufacturer: 'Hallam Electric', model: 'HX-40', voltageKv: 33, ratedCurrentA: 1250, criticality: 5, condition: 3,
      components: ['A', 'B', 'C', 'N', 'Neutral link'], intervalMonths: 6, version: 1,
    })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body).toMatchObject({
      label: 'Bay 3 breaker', manufacturer: 'Hallam Electric', model: 'HX-40', voltageKv: 33, ratedCurrentA: 1250,
      criticality: 5, condition: 3, components: ['A', 'B', 'C', 'N', 'Neutral link'], intervalMonths: 6, version: 2,
    })
    const archived = await owner.post(`/api/orgs/${slug}/assets/${id}/archive`, { version: 2 })
    expect(archived.body.archivedAt).not.toBeNull()
    const restored = await owner.post(`/api/orgs/${slug}/assets/${id}/unarchive`, { version: archived.body.version })
    expect(restored.body.archivedAt).toBeNull()
  })

  it('answers each wrong field with a plain message at that field', async () => {
    const res = await owner.post(`/api/orgs/${slug}/assets`, {
      siteId: 'nope', label: '', assetClass: 'xfmr', criticality: 7, condition: 0, components: [], intervalMonths: 1.5, ratedCurrentA: 'lots',
    })
    expect(res.status).toBe(400)
    const f = res.body.data.fieldErrors
    expect(f.siteId[0]).toBe('Choose a site.')
    expect(f.label[0]).toMatch(/Enter a label/)
    expect(f.assetClass[0]).toBe('Choose the class of equipment.')
    expect(f.criticality[0]).toMatch(/1 \(low\) to 5 \(highest\)/)
    expect(f.condition[0]).toMatch(/1 \(good\), 2 \(fair\) or 3 \(poor\)/)
    expect(f.components[0]).toMatch(/at least one component/)
    expect(f.intervalMonths[0]).toMatch(/whole number of months/)
    expect(f.ratedCurrentA[0]).toMatch(/rated current in A/)
  })

  it('refuses a site of another organisation as if it did not exist', async () => {
    const { client: other, slug: otherSlug } = await signUpOwner('Cy Dunn', 'cy@assets.test', 'Other Grid')
    const foreign = await createSite(other, otherSlug, { code: 'OT-1' })
    const res = await owner.post(`/api/orgs/${slug}/assets`, { siteId: foreign.id, label: 'T9', assetClass: 'transformer' })
    expect(res.status).toBe(400)
    expect(res.body.data.fieldErrors.siteId[0]).toBe('Choose a site of this organisation.')
    expect(JSON.stringify(res.body)).not.toContain('OT-1')
  })

  it('keeps labels unique within a site only', async () => {
    const a = await createSite(owner, slug, { code: 'LBL-A' })
    const b = await createSite(owner, slug, { code: 'LBL-B' })
    await createAsset(owner, slug, a.id, { label: 'CB1', assetClass: 'breaker' })
    const dup = await owner.post(`/api/orgs/${slug}/assets`, { siteId: a.id, label: 'CB1', assetClass: 'breaker' })
    expect(dup.status).toBe(409)
    expect(dup.body.data.fieldErrors.label[0]).toMatch(/already has an asset labelled CB1/)
    await createAsset(owner, slug, b.id, { label: 'CB1', assetClass: 'breaker' })
  })

  it('refuses an edit made on a stale version', async () => {
    const site = await createSite(owner, slug, { code: 'LCK' })
    const asset = await createAsset(owner, slug, site.id, { label: 'X1' })
    expect((await owner.patch(`/api/orgs/${slug}/assets/${asset.id}`, { criticality: 4, version: 1 })).status).toBe(200)
    const stale = await owner.patch(`/api/orgs/${slug}/assets/${asset.id}`, { criticality: 2, version: 1 })
    expect(stale.status).toBe(409)
    expect(stale.body.data.message).toMatch(/changed this asset while you were editing/)
    expect((await owner.get(`/api/orgs/${slug}/assets/${asset.id}`)).body).toMatchObject({ criticality: 4, version: 2 })
  })

  it('does not restore an asset whose site is archived', async () => {
    const site = await createSite(owner, slug, { code: 'ARC' })
    const asset = await createAsset(owner, slug, site.id)
    const s = await owner.post(`/api/orgs/${slug}/sites/${site.id}/archive`, { version: site.version })
    expect(s.status).toBe(200)
    const current = (await owner.get(`/api/orgs/${slug}/assets/${asset.id}`)).body
    const res = await owner.post(`/api/orgs/${slug}/assets/${asset.id}/unarchive`, { version: current.version })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toMatch(/Restore the site first/)
  })
})

describe('the asset list (server-side search, filters, sort and pages)', () => {
  let org: string
  let client: ApiClient
  interface Row { id: string; label: string; assetClass: string; criticality: number; condition: number; manufacturer: string; site: { id: string; name: string } }
  const sites: Array<{ id: string; name: string }> = []

  beforeAll(async () => {
    ;({ client, slug: org } = await signUpOwner('Di Fox', 'di@assets.test', 'Listmere Power'))
    for (const [code, name] of [['LM-A', 'Aldby'], ['LM-B', 'Brackenholm'], ['LM-C', 'Cowick']] as const) {
      sites.push(await createSite(client, org, { code, name }) as unknown as { id: string; name: string })
    }
    const orgRow = await testDb().selectFrom('organisations').select('id').where('slug', '=', org).executeTakeFirstOrThrow()
    // 130 assets straight into the database: the list is what is under test here, not creation.
    const makers = ['Hallam Electric', 'Northgate Switchgear', 'Pennine Apparatus']
    await testDb().insertInto('assets').values(Array.from({ length: 130 }, (_, i) => ({
      organisation_id: orgRow.id,
      site_id: sites[i % 3]!.id,
      label: `${i % 2 ? 'bay' : 'Bay'} ${String(i).padStart(3, '0')}`,
      asset_class: ASSET_CLASSES[i % ASSET_CLASSES.length]!,
      manufacturer: makers[i % 3]!,
      model: `M${i % 7}`,
      criticality: (i % 5) + 1,
      condition: (i % 3) + 1,
      archived_at: i >= 126 ? new Date() : null,
    }))).execute()
  })

  async function walk(query: string): Promise<{ rows: Row[]; total: number }> {
    const rows: Row[] = []
    let total = 0
    for (let page = 1; page < 20; page++) {
      const res = await client.get(`/api/orgs/${org}/assets?${query}&pageSize=25&page=${page}`)
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      total = res.body.total
      rows.push(...res.body.items)
      if (res.body.items.length < 25) break
    }
    return { rows, total }
  }

  const byLabel = (a: Row, b: Row) => (a.label.toLowerCase() < b.label.toLowerCase() ? -1 : a.label.toLowerCase() > b.label.toLowerCase() ? 1 : 0)

  it('pages through every active asset once, in label order, with the total', async () => {
    const { rows, total } = await walk('')
    expect(total).toBe(126)
    expect(rows).toHaveLength(126)
    expect(new Set(rows.map((r) => r.id)).size).toBe(126)
    expect(rows).toEqual([...rows].sort(byLabel))
    const desc = await walk('dir=desc')
    expect(desc.rows.map((r) => r.id)).toEqual(rows.map((r) => r.id).reverse())
  })

  it('sorts by criticality (ties by label) and by site name', async () => {
    const { rows } = await walk('sort=criticality&dir=desc')
    for (let i = 1; i < rows.length; i++) {
      const [a, b] = [rows[i - 1]!, rows[i]!]
      expect(a.criticality > b.criticality || (a.criticality === b.criticality && byLabel(a, b) <= 0), `${a.label} before ${b.label}`).toBe(true)
    }
    const bySite = await walk('sort=site')
    expect(bySite.rows.map((r) => r.site.name)).toEqual([...bySite.rows.map((r) => r.site.name)].sort())
    expect(bySite.rows[0]!.site.name).toBe('Aldby')
  })

  it('filters by site, class, several criticalities and condition, and shows the archived on request', async () => {
    const site = sites[1]!
    const atSite = await walk(`site=${site.id}`)
    expect(atSite.total).toBe(atSite.rows.length)
    expect(atSite.rows.every((r) => r.site.id === site.id)).toBe(true)
    expect(atSite.total).toBe(42)

    const cls = await walk('class=breaker')
    expect(cls.rows.every((r) => r.assetClass === 'breaker')).toBe(true)
    expect(cls.total).toBe(Array.from({ length: 126 }, (_, i) => i).filter((i) => ASSET_CLASSES[i % ASSET_CLASSES.length] === 'breaker').length)

    const crit = await walk('criticality=4,5&condition=3')
    expect(crit.rows.every((r) => r.criticality >= 4 && r.condition === 3)).toBe(true)
    expect(crit.total).toBe(Array.from({ length: 126 }, (_, i) => i).filter((i) => (i % 5) + 1 >= 4 && (i % 3) + 1 === 3).length)

    const archived = await walk('show=archived')
    expect(archived.rows.map((r) => r.label).sort()).toEqual(['Bay 126', 'Bay 128', 'bay 127', 'bay 129'])
  })

  it('searches label, manufacturer and model, and the site code or name', async () => {
    const maker = await walk('q=northgate')
    expect(maker.total).toBe(Array.from({ length: 126 }, (_, i) => i).filter((i) => i % 3 === 1).length)
    expect(maker.rows.every((r) => r.manufacturer === 'Northgate Switchgear')).toBe(true)

    const label = await walk('q=bay 01')
    expect(label.rows.map((r) => r.label).sort()).toEqual(['Bay 010', 'Bay 012', 'Bay 014', 'Bay 016', 'Bay 018', 'bay 011', 'bay 013', 'bay 015', 'bay 017', 'bay 019'])

    const bySite = await walk('q=cowick')
    expect(bySite.total).toBe(42)
    expect(bySite.rows.every((r) => r.site.name === 'Cowick')).toBe(true)

    // LIKE wildcards typed by a person are taken literally.
    expect((await walk('q=%25')).total).toBe(0)
  })

  it('filters by due status with the schedule rules (never-checked assets are due today)', async () => {
    // shared/schedule.ts nextDue(): an asset never checked is due for a baseline survey today.
    const due = await walk('due=within-30')
    expect(due.total).toBe(126)
    expect(due.rows[0]!).toHaveProperty('dueOn')
    expect((await walk('due=overdue')).total).toBe(0)
  })

  it('answers an empty page past the end and refuses unknown sorts and page sizes', async () => {
    const late = await client.get(`/api/orgs/${org}/assets?page=50&pageSize=25`)
    expect(late.body).toMatchObject({ items: [], total: 126, page: 50 })
    const bad = await client.get(`/api/orgs/${org}/assets?sort=colour&pageSize=1000&criticality=9`)
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['criticality.0', 'pageSize', 'sort'])
  })
})
