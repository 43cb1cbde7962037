import { beforeAll, describe, expect, it } from 'vitest'
import { parseCsv, unguardCell } from '../../shared/csv'
import { CHECK_CSV_COLUMNS, FINDING_CSV_COLUMNS, WORK_ORDER_CSV_COLUMNS } from '../../shared/exports-csv'
import { resetDatabase } from '../support/db'
import { makeOrg, surveyWith, type Org } from '../support/integration-fixtures'

let org: Org
let first: { surveyId: string; findingIds: string[] }
let second: { surveyId: string; findingIds: string[] }

async function csv(path: string) {
  const res = await org.owner.get(path)
  expect(res.status).toBe(200)
  expect(res.headers.get('content-type')).toMatch(/^text\/csv/)
  expect(res.headers.get('content-disposition')).toMatch(/attachment; filename=".+\.csv"/)
  const parsed = parseCsv(res.body as string)
  expect(parsed.errors).toEqual([])
  const [header, ...rows] = parsed.records
  return { header: header!, rows }
}

beforeAll(async () => {
  await resetDatabase()
  org = await makeOrg('export', ['T1', 'T2', 'CB1'])
  // NETA over reference: 2 K → band 4, 10 K → band 3, 20 K → band 1 (ANSI/NETA Table 100.18); ambient at the
  // reference temperature keeps the over-ambient comparison from governing.
  first = await surveyWith(org, '2026-03-01', [
    { asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 42, referenceC: 40, ambientC: 40 },
    { asset: 'T1', component: '=HYPERLINK("http://x")', phase: 'L2', apparentC: 50, referenceC: 40, ambientC: 40 },
    { asset: 'T2', component: 'Bushing, "top"', apparentC: 60, referenceC: 40, ambientC: 40 },
  ])
  // 105 band-4 findings in one survey, so the export crosses its 100-row pages.
  second = await surveyWith(org, '2026-06-01', Array.from({ length: 105 }, (_, i) => ({ asset: 'CB1', component: `Clamp ${String(i).padStart(3, '0')}`, apparentC: 42.5, referenceC: 40, ambientC: 40 })))
}, 180_000)

describe('findings CSV', () => {
  it('has the documented columns, in order', async () => {
    const { header } = await csv(`/api/orgs/${org.slug}/findings/export`)
    expect(header).toEqual(FINDING_CSV_COLUMNS.map((c) => c.name))
  })

  it.each([
    ['every finding', ''],
    ['band 4 only', 'band=4'],
    ['band 1 only', 'band=1'],
    ['one survey', 'surveyId=SURVEY'],
  ])('exports exactly the rows of the list filtered to %s, in list order', async (_, filter) => {
    const q = filter.replace('SURVEY', first.surveyId)
    const list: string[] = []
    for (let page = 1; ; page++) {
      const res = await org.owner.get(`/api/orgs/${org.slug}/findings?${q}&page=${page}&pageSize=100`)
      expect(res.status).toBe(200)
      list.push(...res.body.items.map((f: { id: string }) => f.id))
      if (page * 100 >= res.body.total) break
    }
    const { header, rows } = await csv(`/api/orgs/${org.slug}/findings/export?${q}`)
    const idAt = header.indexOf('finding_id')
    expect(rows.map((r) => r[idAt])).toEqual(list)
    expect(list.length).toBeGreaterThan(0)
  })

  it('round-trips values: numbers as stored, quotes and commas intact, formulas guarded', async () => {
    const { header, rows } = await csv(`/api/orgs/${org.slug}/findings/export?surveyId=${first.surveyId}`)
    const col = (row: string[], name: string) => row[header.indexOf(name)]!
    for (const id of first.findingIds) {
      const row = rows.find((r) => col(r, 'finding_id') === id)!
      const api = (await org.owner.get(`/api/orgs/${org.slug}/findings/${id}`)).body
      expect(Number(col(row, 'object_c'))).toBe(api.objectC)
      expect(Number(col(row, 'rise_over_reference_k'))).toBe(api.riseOverReferenceK)
      expect(Number(col(row, 'band'))).toBe(api.effectiveBand)
      expect(unguardCell(col(row, 'component'))).toBe(api.component)
      expect(col(row, 'survey_date')).toBe('2026-03-01')
    }
    const formula = rows.find((r) => unguardCell(col(r, 'component')).startsWith('=HYPERLINK'))!
    expect(col(formula, 'component').startsWith("'=")).toBe(true)
    expect(rows.some((r) => col(r, 'component') === 'Bushing, "top"')).toBe(true)
    expect(rows.map((r) => Number(col(r, 'band'))).sort()).toEqual([1, 3, 4])
  })

  it('refuses a bad filter at its field', async () => {
    const res = await org.owner.get(`/api/orgs/${org.slug}/findings/export?band=9`)
    expect(res.status).toBe(400)
    expect(res.body.data.fieldErrors.band).toBeTruthy()
  })
})

describe('checks CSV', () => {
  it('has the documented columns and exactly the rows of the filtered checks list', async () => {
    for (const q of ['', 'outcome=clear', 'outcome=finding', `surveyId=${second.surveyId}`, `assetId=${org.assets.T2}`, 'from=2026-05-01&to=2026-12-31']) {
      const list = await org.owner.get(`/api/orgs/${org.slug}/checks?${q}&pageSize=100`)
      expect(list.status, q).toBe(200)
      const { header, rows } = await csv(`/api/orgs/${org.slug}/checks/export?${q}`)
      expect(header).toEqual(CHECK_CSV_COLUMNS.map((c) => c.name))
      expect(rows.map((r) => r[0]), q).toEqual(list.body.items.map((c: { id: string }) => c.id))
    }
    // Survey 1: T1 and T2 with findings, CB1 clear; survey 2: CB1 with findings, T1 and T2 clear.
    const clear = await org.owner.get(`/api/orgs/${org.slug}/checks?outcome=clear`)
    expect(clear.body.total).toBe(3)
    const cb1 = (await csv(`/api/orgs/${org.slug}/checks/export?surveyId=${second.surveyId}&outcome=finding`)).rows
    expect(cb1).toHaveLength(1)
    expect(cb1[0]![CHECK_CSV_COLUMNS.findIndex((c) => c.name === 'finding_count')]).toBe('105')
  })
})

describe('work orders CSV', () => {
  it('has the documented columns and exactly the rows of the filtered work-order list', async () => {
    // Three work orders: band 1 (T2's bushing), band 3 (T1 L2) moved to planned, band 4 (two clamps).
    const [t1l1, t1l2, t2] = first.findingIds
    const raised: string[] = []
    for (const ids of [[t2], [t1l2], [second.findingIds[0], second.findingIds[1]]]) {
      const res = await org.owner.post(`/api/orgs/${org.slug}/work-orders`, { findingIds: ids })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      raised.push(res.body.id)
    }
    const planned = await org.owner.get(`/api/orgs/${org.slug}/work-orders/${raised[1]}`)
    expect((await org.owner.post(`/api/orgs/${org.slug}/work-orders/${raised[1]}/move`, { to: 'planned', version: planned.body.version })).status).toBe(200)
    expect(t1l1).toBeTruthy()
    for (const q of ['', 'state=open', 'state=planned', 'band=1', 'sort=band', 'state=active&sort=newest']) {
      const list = await org.owner.get(`/api/orgs/${org.slug}/work-orders?${q}&pageSize=100`)
      expect(list.status, q).toBe(200)
      const { header, rows } = await csv(`/api/orgs/${org.slug}/work-orders/export?${q}`)
      expect(header).toEqual(WORK_ORDER_CSV_COLUMNS.map((c) => c.name))
      expect(rows.map((r) => r[0]), q).toEqual(list.body.items.map((w: { id: string }) => w.id))
    }
    const { header, rows } = await csv(`/api/orgs/${org.slug}/work-orders/export?sort=band`)
    expect(rows.map((r) => r[header.indexOf('band')])).toEqual(['1', '3', '4'])
    expect(rows.map((r) => r[header.indexOf('state')])).toEqual(['open', 'planned', 'open'])
    expect(rows[2]![header.indexOf('finding_count')]).toBe('2')
  })
})
