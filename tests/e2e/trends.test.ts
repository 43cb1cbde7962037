import { beforeAll, describe, expect, it } from 'vitest'
import { resetDatabase } from '../support/db'
import { makeOrg, surveyWith, type Org } from '../support/integration-fixtures'

let org: Org

beforeAll(async () => {
  await resetDatabase()
  org = await makeOrg('trend', ['T1', 'CB1'])
  // Three surveys 100 days apart (counted: 2026-01-10 → 04-20 → 07-29). The line-side lug of T1 phase L1 rises
  // 2, 4, 7 K over its reference; phase L2 stays at 3 K; CB1's clamp is read once with load and rating.
  await surveyWith(org, '2026-01-10', [
    { asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 42, referenceC: 40 },
    { asset: 'T1', component: 'Line-side lug', phase: 'L2', apparentC: 43, referenceC: 40 },
  ])
  await surveyWith(org, '2026-04-20', [
    { asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 44, referenceC: 40 },
    { asset: 'T1', component: 'line-side lug ', phase: 'L2', apparentC: 43, referenceC: 40 },
    { asset: 'CB1', component: 'Clamp', apparentC: 45, referenceC: 40, loadA: 400, ratedA: 800 },
  ])
  await surveyWith(org, '2026-07-29', [
    { asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 47, referenceC: 40 },
    { asset: 'T1', component: 'Line-side lug', phase: 'L2', apparentC: 43, referenceC: 40 },
  ])
}, 120_000)

describe('trends of an asset', () => {
  it('projects the rising component as the hand-fitted line does', async () => {
    const res = await org.owner.get(`/api/orgs/${org.slug}/assets/${org.assets.T1}/trends?component=Line-side%20lug&phase=L1`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.components).toHaveLength(1)
    const t = res.body.components[0]
    expect(t).toMatchObject({ component: 'Line-side lug', phase: 'L1', basis: 'overReference', quantity: 'measured', criteriaId: 'neta-100-18' })
    expect(t.points.map((p: { date: string }) => p.date)).toEqual(['2026-01-10', '2026-04-20', '2026-07-29'])
    // ε = 1: the rise is the difference of the typed temperatures (2, 4, 7 K), to the engine's round-off.
    t.points.forEach((p: { valueK: number }, i: number) => expect(p.valueK).toBeCloseTo([2, 4, 7][i]!, 6))
    // By hand: x = 0, 100, 200 d; x̄ = 100, ȳ = 13/3; Sxx = 20 000; Sxy = (−100)(2 − 13/3) + 100(7 − 13/3) = 500;
    // b = 0.025 K/d = 9.13125 K/yr; a = 13/3 − 2.5 = 1.8333 K.
    expect(t.fit.slopeKPerYear).toBeCloseTo(0.025 * 365.25, 6)
    expect(t.fit.interceptK).toBeCloseTo(13 / 3 - 2.5, 6)
    // Next NETA over-reference edge above 7 K is 15 K (ANSI/NETA Table 100.18); x̂ = 100 + (15 − 13/3)/0.025 = 526.67 d
    // → day 527 after 2026-01-10 = 2027-06-21 (counted by hand: 365 d to 2027-01-10, then 162 d).
    expect(t.projection).toMatchObject({ status: 'projected', date: '2027-06-21', df: 1 })
    expect(t.projection.edge.value).toBe(15)
    // Three points, SSE = 1/6 K², t(0.975, 1) = 12.706 (NIST/SEMATECH table): b² = 6.25e-4 < t²s²/Sxx = 1.35e-3, so the
    // slope cannot be told from zero at 95 % and the crossing range is unbounded (no dates).
    expect(t.projection.earliest).toBeNull()
    expect(t.projection.latest).toBeNull()
  })

  it('groups readings of the same component whatever the spacing and case, and shows no projection for a flat one', async () => {
    const res = await org.owner.get(`/api/orgs/${org.slug}/assets/${org.assets.T1}/trends`)
    expect(res.body.components.map((c: { phase: string; points: unknown[] }) => [c.phase, c.points.length])).toEqual([['L1', 3], ['L2', 3]])
    const flat = res.body.components.find((c: { phase: string }) => c.phase === 'L2')
    expect(flat.projection.status).toBe('not-rising')
  })

  it('scales to rated load when the reading has load and rating, and needs three readings to project', async () => {
    const res = await org.owner.get(`/api/orgs/${org.slug}/assets/${org.assets.CB1}/trends`)
    const t = res.body.components[0]
    expect(t.quantity).toBe('loadScaled')
    // 5 K at 400 A of 800 A rated: 5 × (800/400)² = 20 K (reference sheet §2, n = 2).
    expect(t.points[0].valueK).toBeCloseTo(20, 6)
    expect(t.projection.status).toBe('too-few-points')
  })

  it('keeps other organisations out', async () => {
    const other = await makeOrg('elsewhere', ['X1'])
    const res = await other.owner.get(`/api/orgs/${other.slug}/assets/${org.assets.T1}/trends`)
    expect(res.status).toBe(404)
  })
})
