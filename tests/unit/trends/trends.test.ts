import { describe, expect, it } from 'vitest'
import {
  bandEdges, buildTrend, crossingOf, fitLine, predictionHalfWidth, studentTCdf, studentTQuantile, type TrendReading,
} from '../../../shared/trends'
import { NETA_100_18 } from '../../../shared/thermal/criteria'

// A synthetic series, fitted by hand (closed form, sums written out below):
//   x (days)  0     100   200   300   400
//   y (K)     2.0   3.1   3.9   5.2   5.8
// x̄ = 200, ȳ = 20 / 5 = 4.0
// Sxx = 200² + 100² + 0 + 100² + 200² = 100 000
// Sxy = (−200)(−2.0) + (−100)(−0.9) + 0 + (100)(1.2) + (200)(1.8) = 400 + 90 + 120 + 360 = 970
// b = Sxy / Sxx = 0.0097 K/day, a = ȳ − b·x̄ = 4.0 − 1.94 = 2.06 K
// fitted 2.06, 3.03, 4.00, 4.97, 5.94 → residuals −0.06, 0.07, −0.10, 0.23, −0.14
// SSE = 0.0036 + 0.0049 + 0.0100 + 0.0529 + 0.0196 = 0.0910, s² = SSE / (n − 2) = 0.0910 / 3
const series = [[0, 2.0], [100, 3.1], [200, 3.9], [300, 5.2], [400, 5.8]].map(([x, y]) => ({ x: x!, y: y! }))
const HAND = { slope: 0.0097, intercept: 2.06, s2: 0.091 / 3, sxx: 100_000, xMean: 200, yMean: 4.0, n: 5 }

// Critical values t(1 − α/2, ν) for α = 0.05 (column 0.975) and one-sided 0.95, from the NIST/SEMATECH
// e-Handbook of Statistical Methods, §1.3.6.7.2 "Critical Values of the Student's t Distribution" (three decimals).
const NIST_T_0975: Array<[number, number]> = [[1, 12.706], [2, 4.303], [3, 3.182], [4, 2.776], [5, 2.571], [6, 2.447], [8, 2.306], [10, 2.228], [20, 2.086], [30, 2.042], [100, 1.984]]
const NIST_T_095: Array<[number, number]> = [[1, 6.314], [2, 2.920], [3, 2.353], [5, 2.015], [10, 1.812], [30, 1.697]]

describe('Student t quantiles', () => {
  it.each(NIST_T_0975)('t(0.975, %i) matches the NIST/SEMATECH table (%f)', (df, expected) => {
    expect(studentTQuantile(0.975, df)).toBeCloseTo(expected, 3)
  })
  it.each(NIST_T_095)('t(0.95, %i) matches the NIST/SEMATECH table (%f)', (df, expected) => {
    expect(studentTQuantile(0.95, df)).toBeCloseTo(expected, 3)
  })
  it('is symmetric and inverts the CDF', () => {
    expect(studentTQuantile(0.025, 4)).toBeCloseTo(-2.776, 3) // NIST/SEMATECH table, by symmetry
    expect(studentTCdf(studentTQuantile(0.9, 7), 7)).toBeCloseTo(0.9, 10)
    // ν = 1 is the Cauchy distribution: P(T ≤ 1) = 1/2 + arctan(1)/π = 0.75 exactly (closed form).
    expect(studentTCdf(1, 1)).toBeCloseTo(0.75, 12)
    expect(() => studentTQuantile(1, 3)).toThrow()
  })
})

describe('ordinary least squares', () => {
  it('fits the synthetic series as the hand computation does', () => {
    const fit = fitLine(series)!
    expect(fit.slope).toBeCloseTo(HAND.slope, 12)
    expect(fit.intercept).toBeCloseTo(HAND.intercept, 12)
    expect(fit.sxx).toBeCloseTo(HAND.sxx, 9)
    expect(fit.residualSd ** 2).toBeCloseTo(HAND.s2, 12)
    expect(fit.slopeSe).toBeCloseTo(Math.sqrt(HAND.s2 / HAND.sxx), 12)
    // R² = 1 − SSE/Syy with Syy = 4 + 0.81 + 0.01 + 1.44 + 3.24 = 9.5 (by hand)
    expect(fit.rSquared).toBeCloseTo(1 - 0.091 / 9.5, 12)
  })
  it('refuses what cannot be fitted', () => {
    expect(fitLine([{ x: 1, y: 1 }])).toBeNull()
    expect(fitLine([{ x: 1, y: 1 }, { x: 1, y: 2 }])).toBeNull()
  })
})

describe('projection of a band-edge crossing', () => {
  const fit = fitLine(series)!
  const t = 3.182 // NIST/SEMATECH t(0.975, 3)
  const k = t * t * HAND.s2

  it('gives the prediction half-width t·s·√(1 + 1/n + (x − x̄)²/Sxx)', () => {
    const expected = t * Math.sqrt(HAND.s2) * Math.sqrt(1 + 1 / 5 + (600 - 200) ** 2 / 100_000)
    expect(predictionHalfWidth(fit, 600)).toBeCloseTo(expected, 3)
  })

  it('crosses 15 K where the hand-fitted line does, inside the inverse-prediction range', () => {
    // x̂ = x̄ + (E − ȳ)/b = 200 + 11 / 0.0097 = 1334.02… days
    const c = crossingOf(fit, 15)!
    expect(c.x).toBeCloseTo(200 + 11 / 0.0097, 6)
    // Range from the quadratic (b² − t²s²/Sxx)u² + 2b(ȳ − E)u + (ȳ − E)² − t²s²(1 + 1/n) = 0, solved here by the
    // quadratic formula with the hand figures and the tabled t (so agreement is to the table's three decimals).
    const A = HAND.slope ** 2 - k / HAND.sxx
    const B = 2 * HAND.slope * (HAND.yMean - 15)
    const C = (HAND.yMean - 15) ** 2 - k * (1 + 1 / 5)
    const r = Math.sqrt(B * B - 4 * A * C)
    expect(c.earliest!).toBeCloseTo(200 + (-B - r) / (2 * A), 0)
    expect(c.latest!).toBeCloseTo(200 + (-B + r) / (2 * A), 0)
    expect(c.earliest!).toBeLessThan(c.x)
    expect(c.latest!).toBeGreaterThan(c.x)
    // At the earliest date the upper prediction bound touches the edge; at the latest the lower bound does.
    const line = (x: number) => fit.intercept + fit.slope * x
    expect(line(c.earliest!) + predictionHalfWidth(fit, c.earliest!)).toBeCloseTo(15, 6)
    expect(line(c.latest!) - predictionHalfWidth(fit, c.latest!)).toBeCloseTo(15, 6)
  })

  it('leaves the range unbounded when the slope cannot be told from zero', () => {
    const noisy = fitLine([{ x: 0, y: 2 }, { x: 100, y: 6 }, { x: 200, y: 1 }, { x: 300, y: 6 }])!
    expect(noisy.slope).toBeGreaterThan(0)
    expect(crossingOf(noisy, 15)).toMatchObject({ earliest: null, latest: null })
  })
})

describe('band edges and the trend of a component', () => {
  it('lists the NETA over-reference edges (ANSI/NETA Table 100.18: 1, 3, 15 K)', () => {
    expect(bandEdges(NETA_100_18.overReference!).map((e) => [e.value, e.entersBand])).toEqual([[1, 4], [3, 3], [15, 1]])
  })

  const reading = (id: string, date: string, ref: number | null, extra: Partial<TrendReading> = {}): TrendReading => ({
    id, date, source: 'finding', riseOverReferenceK: ref, riseOverAmbientK: ref === null ? null : ref + 10, loadA: null, ratedA: null, band: null, ...extra,
  })

  it('projects the synthetic series (dates 100 days apart) towards 15 K, with the measured rise', () => {
    const dates = ['2026-01-01', '2026-04-11', '2026-07-20', '2026-10-28', '2027-02-05'] // 100 days apart (counted)
    const trend = buildTrend(series.map((p, i) => reading(`r${i}`, dates[i]!, p.y)), NETA_100_18)
    expect(trend.basis).toBe('overReference')
    expect(trend.quantity).toBe('measured')
    expect(trend.fit!.slopeKPerYear).toBeCloseTo(0.0097 * 365.25, 9)
    expect(trend.projection.status).toBe('projected')
    expect(trend.projection.edge!.value).toBe(15)
    // 2026-01-01 + 1334.02 days → 2029-08-27 (day 1334 counted from 2026-01-01)
    expect(trend.projection.date).toBe('2029-08-27')
    expect(trend.projection.df).toBe(3)
    expect(trend.projection.t).toBeCloseTo(3.182, 3)
  })

  it('scales to rated load only when every reading has a load (I_rated/I)², else says it used the measured rise', () => {
    const scaled = buildTrend([
      reading('a', '2026-01-01', 2, { loadA: 50, ratedA: 100 }),
      reading('b', '2026-06-01', 3, { loadA: 100, ratedA: 100 }),
    ], NETA_100_18)
    expect(scaled.quantity).toBe('loadScaled')
    expect(scaled.points.map((p) => p.valueK)).toEqual([8, 3]) // 2 K × (100/50)² = 8 K
    expect(scaled.projection.status).toBe('too-few-points')
    const mixed = buildTrend([reading('a', '2026-01-01', 2, { loadA: 50, ratedA: 100 }), reading('b', '2026-06-01', 3)], NETA_100_18)
    expect(mixed.quantity).toBe('measured')
    expect(mixed.points.map((p) => p.valueK)).toEqual([2, 3])
  })

  it('shows no projection for a falling line or one already in the worst band', () => {
    const falling = buildTrend([reading('a', '2026-01-01', 9), reading('b', '2026-03-01', 7), reading('c', '2026-05-01', 5)], NETA_100_18)
    expect(falling.projection.status).toBe('not-rising')
    const worst = buildTrend([reading('a', '2026-01-01', 16), reading('b', '2026-03-01', 18), reading('c', '2026-05-01', 21)], NETA_100_18)
    expect(worst.projection.status).toBe('no-edge-above')
  })

  it('uses the rise over ambient when most readings lack a reference, and counts what it left out', () => {
    const trend = buildTrend([
      reading('a', '2026-01-01', null, { riseOverAmbientK: 5 }),
      reading('b', '2026-02-01', null, { riseOverAmbientK: 6 }),
      reading('c', '2026-03-01', 1),
    ], NETA_100_18)
    expect(trend.basis).toBe('overAmbient')
    expect(trend.points).toHaveLength(3)
    const refOnly = buildTrend([reading('a', '2026-01-01', 2, { riseOverAmbientK: null }), reading('b', '2026-02-01', null, { riseOverAmbientK: 4 })], NETA_100_18)
    expect(refOnly.basis).toBe('overReference')
    expect(refOnly.omitted).toBe(1)
  })
})
